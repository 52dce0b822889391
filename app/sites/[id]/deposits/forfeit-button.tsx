"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { dollars } from "./money";

/** Books the forfeits that are due, after the person confirms what will be booked. */
export function ForfeitButton({ siteId, count, totalCents }: { siteId: string; count: number; totalCents: number }) {
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<{ text: string; isError: boolean } | null>(null);

  async function run() {
    if (!window.confirm(`Book ${count} forfeit${count === 1 ? "" : "s"} for ${dollars(totalCents)}?`)) return;
    setBusy(true);
    const response = await fetch("/api/v1/deposits/forfeits", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ site: siteId }) });
    const body = await response.json().catch(() => ({}));
    setBusy(false);
    if (!response.ok) return setMessage({ text: body.error?.message ?? "Not booked.", isError: true });
    setMessage({ text: `Booked ${body.count} forfeit${body.count === 1 ? "" : "s"} for ${dollars(body.totalCents)}. Deposits held now ${dollars(body.balanceCents)}.`, isError: false });
    router.refresh();
  }

  return (
    <div className="row">
      <button type="button" onClick={run} disabled={busy || count === 0}>
        {busy ? "Booking…" : `Book ${count} forfeit${count === 1 ? "" : "s"}`}
      </button>
      <span aria-live="polite">
        {message && (
          <span className={message.isError ? "error-box" : "notice"} role={message.isError ? "alert" : "status"}>
            {message.text}
          </span>
        )}
      </span>
    </div>
  );
}
