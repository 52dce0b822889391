"use client";

import { useState } from "react";

/** Makes a stored document again from its snapshot on the server and says whether its sha256 is the stored one. */
export function VerifyButton({ documentId }: { documentId: string }) {
  const [result, setResult] = useState<{ isIdentical: boolean; regeneratedSha256: string } | { error: string } | null>(null);
  const [busy, setBusy] = useState(false);
  async function verify() {
    setBusy(true);
    const response = await fetch(`/api/v1/records/documents/${documentId}`);
    const body = await response.json().catch(() => ({}));
    setBusy(false);
    setResult(response.ok ? body.verification : { error: body.error?.message ?? "Could not check." });
  }
  return (
    <span role="status" aria-live="polite">
      <button type="button" onClick={verify} disabled={busy} style={{ padding: "0.15rem 0.5rem", fontSize: "0.8rem" }}>
        Make again and compare
      </button>{" "}
      {result && "error" in result && <span className="error-box">{result.error}</span>}
      {result && "isIdentical" in result &&
        (result.isIdentical ? (
          <span className="status ok">
            <span aria-hidden="true">✓</span> Identical
          </span>
        ) : (
          <span className="status exceeded" title={`made again: ${result.regeneratedSha256}`}>
            <span aria-hidden="true">✗</span> Differs from the stored hash
          </span>
        ))}
    </span>
  );
}
