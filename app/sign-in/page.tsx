import type { Metadata } from "next";
import { SignInForm } from "./sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

export default function SignInPage() {
  return (
    <main style={{ maxWidth: 420, marginTop: "8vh" }}>
      <h1>
        Lead<span style={{ color: "var(--sulfur-deep)" }}>ger</span>
      </h1>
      <p className="lede">Spent batteries from the counter to the smelter.</p>
      <div className="card">
        <SignInForm />
      </div>
    </main>
  );
}
