import type { Metadata } from "next";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Leadger", template: "%s · Leadger" },
  description: "Spent lead-acid batteries from the counter to the smelter: what each site holds, against its limits.",
};

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <body>{children}</body>
    </html>
  );
}
