"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";

export function RevokeKeyButton({ id, name }: { id: string; name: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function revoke() {
    if (!window.confirm(`Revoke the key “${name}”? Anything using it stops working at once.`)) return;
    setBusy(true);
    const response = await fetch(`/api/v1/api-keys/${id}`, { method: "DELETE" });
    setBusy(false);
    if (!response.ok) {
      const body = await response.json().catch(() => ({}));
      setError(body.error?.message ?? "Not revoked.");
      return;
    }
    router.refresh();
  }

  return (
    <>
      <button type="button" onClick={revoke} disabled={busy} aria-label={`Revoke ${name}`}>
        Revoke
      </button>
      {error && (
        <span role="alert" className="field-error">
          {error}
        </span>
      )}
    </>
  );
}
