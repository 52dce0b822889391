import Link from "next/link";

export default function NotFound() {
  return (
    <main>
      <h1>Nothing here</h1>
      <p>There is no such page or record in your organisation.</p>
      <Link href="/">Back to your sites</Link>
    </main>
  );
}
