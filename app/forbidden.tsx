import Link from "next/link";

export default function Forbidden() {
  return (
    <main>
      <h1>Not open to your role</h1>
      <p>Your role at this site does not open this screen. Ask an administrator if you need it.</p>
      <Link href="/">Back to your sites</Link>
    </main>
  );
}
