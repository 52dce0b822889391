"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";

export type TIssue = { field: string; message: string };
export type TApiError = { message: string; issues: TIssue[] };

/** Sends JSON to the API from a screen; on success refreshes the server-rendered page, on failure keeps the error and its field issues. */
export function useApi() {
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<TApiError | null>(null);
  async function send(url: string, { method = "POST", body }: { method?: string; body?: unknown } = {}): Promise<unknown | null> {
    setBusy(true);
    setError(null);
    try {
      const response = await fetch(url, { method, headers: body === undefined ? {} : { "content-type": "application/json" }, body: body === undefined ? undefined : JSON.stringify(body) });
      const result = (await response.json().catch(() => ({}))) as { error?: TApiError };
      if (!response.ok) {
        setError({ message: result.error?.message ?? "Not saved.", issues: result.error?.issues ?? [] });
        return null;
      }
      router.refresh();
      return result;
    } catch {
      setError({ message: "The server could not be reached; nothing was saved.", issues: [] });
      return null;
    } finally {
      setBusy(false);
    }
  }
  return { busy, error, send, issueFor: (field: string) => error?.issues.find((i) => i.field === field)?.message };
}

export function ErrorBox({ error }: { error: TApiError | null }) {
  if (!error) return null;
  return (
    <div className="error-box" role="alert">
      <strong>{error.message}</strong>
      {error.issues.length > 0 && (
        <ul>
          {error.issues.map((i) => (
            <li key={i.field + i.message}>{i.message}</li>
          ))}
        </ul>
      )}
    </div>
  );
}
