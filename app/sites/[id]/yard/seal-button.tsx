"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";

export function SealButton({ containerId, labelNumber }: { containerId: string; labelNumber: string }) {
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  async function seal() {
    setBusy(true);
    const response = await fetch(`/api/v1/containers/${containerId}`, { method: "PATCH", headers: { "content-type": "application/json" }, body: JSON.stringify({ state: "sealed" }) });
    const body = await response.json().catch(() => ({}));
    setBusy(false);
    if (!response.ok) return setError(body.error?.issues?.[0]?.message ?? body.error?.message ?? "Not sealed.");
    setError(null);
    router.refresh();
  }
  return (
    <>
      <button type="button" onClick={seal} disabled={busy} aria-label={`Seal ${labelNumber}`} style={{ padding: "0.15rem 0.6rem", fontSize: "0.85rem" }}>
        {busy ? "Sealing…" : "Seal"}
      </button>
      {error && (
        <span className="field-error" role="alert">
          {" "}
          {error}
        </span>
      )}
    </>
  );
}
