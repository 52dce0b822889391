"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";

type TIssue = { field: string; message: string };

export function NewContainerForm({ siteId, bays }: { siteId: string; bays: { id: string; name: string }[] }) {
  const router = useRouter();
  const [issues, setIssues] = useState<TIssue[]>([]);
  const [message, setMessage] = useState<{ text: string; isError: boolean } | null>(null);
  const [kind, setKind] = useState("pallet");
  const issue = (field: string) => issues.find((i) => i.field === field)?.message;

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const labelNumber = String(form.get("labelNumber") ?? "").trim();
    const bayId = String(form.get("bayId") ?? "");
    const response = await fetch("/api/v1/containers", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ site: siteId, kind, labelNumber: labelNumber || undefined, bayId: bayId || undefined, isClosed: form.get("isClosed") === "on" }),
    });
    const body = await response.json().catch(() => ({}));
    if (!response.ok) {
      setIssues(body.error?.issues ?? []);
      setMessage({ text: body.error?.message ?? "Not added.", isError: true });
      return;
    }
    setIssues([]);
    setMessage({ text: `Added ${body.container.labelNumber}.`, isError: false });
    (event.target as HTMLFormElement).reset();
    router.refresh();
  }

  return (
    <form className="card grid" style={{ gridTemplateColumns: "repeat(auto-fit, minmax(160px, 1fr))", alignItems: "end" }} onSubmit={submit} aria-label="Add a container" noValidate>
      <div>
        <label htmlFor="new-kind">Kind</label>
        <select id="new-kind" value={kind} onChange={(e) => setKind(e.target.value)}>
          <option value="pallet">Pallet</option>
          <option value="box">Box</option>
          <option value="tote">Tote</option>
          <option value="drum">Drum</option>
        </select>
      </div>
      <div>
        <label htmlFor="new-label">
          Label number <span className="hint">blank: the next free one</span>
        </label>
        <input id="new-label" name="labelNumber" autoComplete="off" aria-invalid={issue("labelNumber") ? true : undefined} aria-describedby={issue("labelNumber") ? "new-label-error" : undefined} />
        {issue("labelNumber") && (
          <p className="field-error" id="new-label-error">
            {issue("labelNumber")}
          </p>
        )}
      </div>
      <div>
        <label htmlFor="new-bay">Bay</label>
        <select id="new-bay" name="bayId" defaultValue={bays[0]?.id ?? ""}>
          <option value="">No bay</option>
          {bays.map((b) => (
            <option key={b.id} value={b.id}>
              {b.name}
            </option>
          ))}
        </select>
      </div>
      <label style={{ display: "flex", gap: "0.4rem", alignItems: "center", fontWeight: 500 }}>
        <input type="checkbox" name="isClosed" defaultChecked={kind === "drum"} key={kind} style={{ width: "auto" }} />
        Closed container (for leaking or cracked units)
      </label>
      <button type="submit">Add container</button>
      <span aria-live="polite" style={{ gridColumn: "1 / -1" }}>
        {message && (
          <span className={message.isError ? "field-error" : "small"} role={message.isError ? "alert" : "status"}>
            {message.text}
          </span>
        )}
      </span>
    </form>
  );
}
