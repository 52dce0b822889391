"use client";

export function SignOutButton() {
  async function signOut() {
    await fetch("/api/auth/sign-out", { method: "POST", headers: { "content-type": "application/json" }, body: "{}" });
    window.location.assign("/sign-in");
  }
  return (
    <button type="button" onClick={signOut} style={{ padding: "0.2rem 0.6rem", fontSize: "0.85rem" }}>
      Sign out
    </button>
  );
}
