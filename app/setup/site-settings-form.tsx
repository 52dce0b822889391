"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import styles from "./setup.module.css";

type TSite = {
  id: string;
  name: string;
  kind: string;
  address: string;
  jurisdiction: string;
  rulebookId: string;
  unitSystem: string;
  isConsumerExempt: boolean;
  regulatoryIds: string;
};
type TIssue = { field: string; message: string };

/** Edits one site's settings through PATCH /api/v1/sites/:id; field messages come back from the API. */
export function SiteSettingsForm(props: { site: TSite; kinds: string[]; unitSystems: string[]; rulebooks: { id: string; label: string }[]; exemptionHint: string }) {
  const router = useRouter();
  const { site } = props;
  const [issues, setIssues] = useState<TIssue[]>([]);
  const [message, setMessage] = useState<{ text: string; isError: boolean } | null>(null);
  const [busy, setBusy] = useState(false);
  const id = (field: string) => `${site.id}-${field}`;
  const issue = (field: string) => issues.find((i) => i.field === field)?.message;
  const invalid = (field: string) => (issue(field) ? { "aria-invalid": true as const, "aria-describedby": id(`${field}-error`) } : {});
  const error = (field: string) => issue(field) && <p className="field-error" id={id(`${field}-error`)}>{issue(field)}</p>;

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const text = (name: string) => String(form.get(name) ?? "");
    const body = {
      name: text("name"),
      kind: text("kind"),
      address: text("address"),
      jurisdiction: text("jurisdiction"),
      rulebookId: text("rulebookId"),
      unitSystem: text("unitSystem"),
      isConsumerExempt: form.get("isConsumerExempt") === "on",
      regulatoryIds: text("regulatoryIds"),
    };
    setBusy(true);
    setMessage(null);
    const response = await fetch(`/api/v1/sites/${site.id}`, { method: "PATCH", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
    const result = await response.json().catch(() => ({}));
    setBusy(false);
    if (!response.ok) {
      setIssues(result.error?.issues ?? []);
      setMessage({ text: result.error?.message ?? "Not saved.", isError: true });
      return;
    }
    setIssues([]);
    setMessage({ text: "Saved.", isError: false });
    router.refresh();
  }

  return (
    <form className={styles.form} onSubmit={submit} noValidate aria-label={`Settings of ${site.name}`}>
      <div>
        <label htmlFor={id("name")}>Name</label>
        <input id={id("name")} name="name" defaultValue={site.name} required maxLength={120} {...invalid("name")} />
        {error("name")}
      </div>
      <div>
        <label htmlFor={id("kind")}>Kind</label>
        <select id={id("kind")} name="kind" defaultValue={site.kind} {...invalid("kind")}>
          {props.kinds.map((k) => (
            <option key={k} value={k}>
              {k === "store" ? "Store" : "Collection yard"}
            </option>
          ))}
        </select>
        {error("kind")}
      </div>
      <div className={styles.wide}>
        <label htmlFor={id("address")}>Address</label>
        <input id={id("address")} name="address" defaultValue={site.address} maxLength={400} {...invalid("address")} />
        {error("address")}
      </div>
      <div>
        <label htmlFor={id("jurisdiction")}>
          Jurisdiction <span className="hint">country, optionally region: US-WA, DE-BY</span>
        </label>
        <input id={id("jurisdiction")} name="jurisdiction" defaultValue={site.jurisdiction} maxLength={6} {...invalid("jurisdiction")} />
        {error("jurisdiction")}
      </div>
      <div>
        <label htmlFor={id("rulebookId")}>Rulebook</label>
        <select id={id("rulebookId")} name="rulebookId" defaultValue={site.rulebookId} {...invalid("rulebookId")}>
          {props.rulebooks.map((r) => (
            <option key={r.id} value={r.id}>
              {r.label}
            </option>
          ))}
        </select>
        {error("rulebookId")}
      </div>
      <div>
        <label htmlFor={id("unitSystem")}>Show masses in</label>
        <select id={id("unitSystem")} name="unitSystem" defaultValue={site.unitSystem} {...invalid("unitSystem")}>
          {props.unitSystems.map((u) => (
            <option key={u} value={u}>
              {u === "kg" ? "kilograms (kg)" : "pounds (lb)"}
            </option>
          ))}
        </select>
        {error("unitSystem")}
      </div>
      <div>
        <label htmlFor={id("regulatoryIds")}>
          Regulatory IDs <span className="hint">e.g. the EPA ID number</span>
        </label>
        <input id={id("regulatoryIds")} name="regulatoryIds" defaultValue={site.regulatoryIds} maxLength={200} {...invalid("regulatoryIds")} />
        {error("regulatoryIds")}
      </div>
      <div className={styles.wide}>
        <label className={styles.check} htmlFor={id("isConsumerExempt")}>
          <input type="checkbox" id={id("isConsumerExempt")} name="isConsumerExempt" defaultChecked={site.isConsumerExempt} aria-describedby={id("exempt-hint")} />
          Consumer-product exemption (Tier II)
        </label>
        <p className="hint" id={id("exempt-hint")}>
          {props.exemptionHint}
        </p>
        {error("isConsumerExempt")}
      </div>
      <div className={styles.actions}>
        <button className="primary" type="submit" disabled={busy}>
          {busy ? "Saving…" : "Save site"}
        </button>
        {message && (
          <p role={message.isError ? "alert" : "status"} className={message.isError ? "error-box" : "notice"} style={{ margin: 0 }}>
            {message.text}
          </p>
        )}
      </div>
    </form>
  );
}
