import { randomUUID } from "node:crypto";
import Papa from "papaparse";
import { beforeAll, describe, expect, test } from "vitest";
import type { TDb } from "@/lib/db/client";
import { sha256 } from "@/lib/papers/pdf-base";
import { GENERAL_CAUTION } from "@/lib/cautions";
import { getRulebook } from "@/lib/rules";
import { testDb } from "../helpers/db";
import { apiRequest, params } from "../helpers/factories";
import { fmt, pdfPages, squash } from "../unit/papers/pdf-tools";
import { US_FULL_ALL, call, loadRoutes, makeSealedContainer, makeShippingSite, type TRoutes } from "./loads-fixtures";

let db: TDb;
let r: TRoutes;

beforeAll(async () => {
  db = await testDb();
  r = await loadRoutes();
});

const units = (n: number, batteryKg: number, kind = "flooded") => Array.from({ length: n }, () => ({ kind, batteryKg }));
const today = () => new Date().toISOString().slice(0, 10);

/** A planned US load with flooded and AGM units on two pallets, the whole checklist ticked. */
async function usLoad({ emergencyPhone }: { emergencyPhone?: string } = {}) {
  const s = await makeShippingSite(db, emergencyPhone ? { emergencyPhone } : {});
  const a = await makeSealedContainer(db, { siteId: s.site.id, units: units(6, 18.4) });
  const b = await makeSealedContainer(db, { siteId: s.site.id, units: [...units(3, 21.7, "agm"), ...units(2, 29.3, "deep-cycle")] });
  const created = await call(r.loads.POST, { path: "/api/v1/loads", method: "POST", key: s.keys.compliance, body: { site: s.site.id, facilityId: s.facility.id, carrierId: s.carrier.id, basis: "us-full", vehicle: "Truck 3" } });
  const load = created.body.load as { id: string; reference: string };
  await call(r.containers.POST, { path: `/api/v1/loads/${load.id}/containers`, method: "POST", key: s.keys.compliance, body: { containerIds: [a.id, b.id] }, ids: { id: load.id } });
  await call(r.load.PATCH, { path: `/api/v1/loads/${load.id}`, method: "PATCH", key: s.keys.compliance, body: { checklist: US_FULL_ALL }, ids: { id: load.id } });
  return { ...s, load, containers: [a, b] };
}

async function pdfOf(handler: (req: Request, ctx: { params: Promise<{ id: string }> }) => Promise<Response>, path: string, key: string, id: string) {
  const response = await handler(apiRequest(path, { key }), params({ id }));
  const bytes = Buffer.from(await response.arrayBuffer());
  return { response, bytes };
}

describe("GET /api/v1/loads/:id/manifest.pdf", () => {
  test("the served manifest carries the exact descriptions and certification, and its totals match the load in the database", async () => {
    const s = await usLoad();
    const { response, bytes } = await pdfOf(r.manifest.GET, `/api/v1/loads/${s.load.id}/manifest.pdf`, s.keys.compliance, s.load.id);
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toBe("application/pdf");
    const text = squash(pdfPages(bytes).join("\n"));

    // REFERENCES.md, Transport: 49 CFR 172.101 entries in the 172.202(a) order
    expect(text).toContain("UN2794, Batteries, wet, filled with acid, electric storage, 8, PG III");
    expect(text).toContain("UN2800, Batteries, wet, non-spillable, electric storage, 8, PG III");
    // REFERENCES.md, Transport: the shipper's certification of 49 CFR 172.204(a)(1), word for word
    expect(text).toContain(
      "This is to certify that the above-named materials are properly classified, described, packaged, marked and labeled, and are in proper condition for transportation according to the applicable regulations of the Department of Transportation.",
    );
    expect(text).toContain(`Emergency response telephone: +1 555 0100 (test duty desk)`);
    expect(text).toContain(squash(GENERAL_CAUTION));
    expect(text).toContain(s.facility.name);
    expect(text).toContain(s.carrier.name);
    expect(text).toContain(s.load.reference);
    expect(text).not.toContain("Draft: this load is not ready");

    // totals against the database
    const dbUnits = await db.unit.findMany({ where: { containerId: { in: s.containers.map((c) => c.id) } } });
    const massKg = dbUnits.reduce((t, u) => t + u.batteryKg, 0);
    const leadKg = dbUnits.reduce((t, u) => t + u.leadKg, 0);
    expect(dbUnits).toHaveLength(11);
    expect(text).toContain(`Total 2 pallets 11 ${fmt(massKg)} kg ${fmt(massKg / 0.45359237)} lb`);
    expect(text).toContain(`Estimated lead for settlement: ${fmt(leadKg)} kg (${fmt(leadKg / 0.45359237)} lb)`);
    const flooded = dbUnits.filter((u) => u.kind !== "agm").reduce((t, u) => t + u.batteryKg, 0);
    expect(text).toContain(`UN2794, Batteries, wet, filled with acid, electric storage, 8, PG III ${fmt(flooded)} kg`);

    // stored: snapshot, rulebook id and version, the hash of the bytes served, and a trail event
    const docs = await db.document.findMany({ where: { loadId: s.load.id } });
    expect(docs).toHaveLength(1);
    const rulebook = getRulebook("us-federal");
    expect(docs[0]).toMatchObject({ kind: "manifest", rulebookId: rulebook.id, rulebookVersion: rulebook.version, sha256: sha256(bytes), siteId: s.site.id });
    expect(response.headers.get("x-document-sha256")).toBe(sha256(bytes));
    const snapshot = JSON.parse(docs[0]!.input);
    expect(snapshot).toMatchObject({ reference: s.load.reference, basis: "us-full", documentSeed: docs[0]!.id, issuedAt: docs[0]!.issuedAt.toISOString() });
    expect(snapshot.units).toHaveLength(11);
    expect(await db.trailEvent.count({ where: { entity: "document", entityId: docs[0]!.id, action: "document.issued" } })).toBe(1);
  });

  test("opened again unchanged it is the same document; a change to the load issues a new one", async () => {
    const s = await usLoad();
    const first = await pdfOf(r.manifest.GET, `/api/v1/loads/${s.load.id}/manifest.pdf`, s.keys.compliance, s.load.id);
    const again = await pdfOf(r.manifest.GET, `/api/v1/loads/${s.load.id}/manifest.pdf`, s.keys.compliance, s.load.id);
    expect(sha256(again.bytes)).toBe(sha256(first.bytes));
    expect(again.response.headers.get("x-document-new")).toBe("false");
    expect(await db.document.count({ where: { loadId: s.load.id } })).toBe(1);

    await call(r.load.PATCH, { path: `/api/v1/loads/${s.load.id}`, method: "PATCH", key: s.keys.compliance, body: { checklist: { "certification-signed": false } }, ids: { id: s.load.id } });
    const changed = await pdfOf(r.manifest.GET, `/api/v1/loads/${s.load.id}/manifest.pdf`, s.keys.compliance, s.load.id);
    expect(changed.response.headers.get("x-document-new")).toBe("true");
    expect(squash(pdfPages(changed.bytes).join("\n"))).toContain("Draft: this load is not ready to ship");
    expect(await db.document.count({ where: { loadId: s.load.id } })).toBe(2);
  });

  test("once the load has left, the manifest that went with it is the answer", async () => {
    const s = await usLoad();
    const issued = await pdfOf(r.manifest.GET, `/api/v1/loads/${s.load.id}/manifest.pdf`, s.keys.compliance, s.load.id);
    await call(r.load.PATCH, { path: `/api/v1/loads/${s.load.id}`, method: "PATCH", key: s.keys.compliance, body: { state: "ready" }, ids: { id: s.load.id } });
    await call(r.depart.POST, { path: `/api/v1/loads/${s.load.id}/depart`, method: "POST", key: s.keys.compliance, body: {}, ids: { id: s.load.id } });
    await db.facility.update({ where: { id: s.facility.id }, data: { address: "moved since" } });
    const later = await pdfOf(r.manifest.GET, `/api/v1/loads/${s.load.id}/manifest.pdf`, s.keys.compliance, s.load.id);
    expect(sha256(later.bytes)).toBe(sha256(issued.bytes));
    expect(await db.document.count({ where: { loadId: s.load.id, kind: "manifest" } })).toBe(1);
  });

  test("papers need papers.issue (the yard role reads loads but issues nothing); another organisation's load is 404", async () => {
    const s = await usLoad();
    const other = await makeShippingSite(db);
    expect((await pdfOf(r.manifest.GET, `/api/v1/loads/${s.load.id}/manifest.pdf`, s.keys.yard, s.load.id)).response.status).toBe(403);
    expect((await pdfOf(r.manifest.GET, `/api/v1/loads/${s.load.id}/manifest.pdf`, other.keys.admin, s.load.id)).response.status).toBe(404);
    expect(await db.document.count({ where: { loadId: s.load.id } })).toBe(0);
  });

  test("an empty load has no manifest yet: 409 with the reason", async () => {
    const s = await makeShippingSite(db);
    const created = await call(r.loads.POST, { path: "/api/v1/loads", method: "POST", key: s.keys.compliance, body: { site: s.site.id, facilityId: s.facility.id, basis: "us-full" } });
    const res = await call(r.manifest.GET, { path: `/api/v1/loads/${created.body.load.id}/manifest.pdf`, key: s.keys.compliance, ids: { id: created.body.load.id } });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain("add sealed containers");
  });
});

describe("retention: regenerating a stored document", () => {
  test("a document is made again byte for byte from its snapshot, and a changed snapshot is caught by the hash", async () => {
    const s = await usLoad();
    const manifest = await pdfOf(r.manifest.GET, `/api/v1/loads/${s.load.id}/manifest.pdf`, s.keys.compliance, s.load.id);
    const receipt = await pdfOf(r.receiptForm.GET, `/api/v1/loads/${s.load.id}/receipt-form.pdf`, s.keys.compliance, s.load.id);
    expect(receipt.response.status).toBe(200);
    const receiptText = squash(pdfPages(receipt.bytes).join("\n"));
    expect(receiptText).toContain("exactly 2 % is within tolerance");

    // Checking and regenerating compare with the stored row; they never write to it.
    const storedBefore = await db.document.findMany({ where: { siteId: s.site.id }, orderBy: { id: "asc" } });
    expect(storedBefore).toHaveLength(2);
    for (const served of [manifest, receipt]) {
      const id = served.response.headers.get("x-document-id")!;
      const verify = await call(r.document.GET, { path: `/api/v1/records/documents/${id}`, key: s.keys.yard, ids: { id } });
      expect(verify.status).toBe(200);
      expect(verify.body.verification).toEqual({ storedSha256: sha256(served.bytes), regeneratedSha256: sha256(served.bytes), isIdentical: true });
      const again = await pdfOf(r.regenerated.GET, `/api/v1/records/documents/${id}/regenerated.pdf`, s.keys.compliance, id);
      expect(Buffer.compare(again.bytes, served.bytes)).toBe(0);
      expect(again.response.headers.get("x-identical")).toBe("true");
    }
    expect(await db.document.findMany({ where: { siteId: s.site.id }, orderBy: { id: "asc" } })).toEqual(storedBefore);

    // An issued document cannot be changed afterwards: the database refuses (document-append-only.test.ts).
    const id = manifest.response.headers.get("x-document-id")!;
    const row = await db.document.findUniqueOrThrow({ where: { id } });
    await expect(db.document.update({ where: { id }, data: { input: row.input.replace(s.facility.name, "Someone Else Ltd") } })).rejects.toThrow(/append-only/);
    expect(await db.document.findUniqueOrThrow({ where: { id } })).toEqual(row);

    const list = await call(r.documents.GET, { path: `/api/v1/records/documents?site=${s.site.id}`, key: s.keys.compliance });
    expect(list.body.documents.map((d: { kind: string }) => d.kind).sort()).toEqual(["manifest", "receipt-form"]);
    expect(list.body.documents[0]).toMatchObject({ loadReference: s.load.reference, issuedByLabel: expect.stringContaining("test compliance") });
    const foreign = await makeShippingSite(db);
    expect((await call(r.document.GET, { path: `/api/v1/records/documents/${id}`, key: foreign.keys.admin, ids: { id } })).status).toBe(404);

    // A row whose snapshot no longer makes the bytes of its hash (written behind the code's back) is caught by the check.
    const forged = await db.document.create({ data: { ...row, id: randomUUID(), input: row.input.replace(s.facility.name, "Someone Else Ltd") } });
    const tampered = await call(r.document.GET, { path: `/api/v1/records/documents/${forged.id}`, key: s.keys.compliance, ids: { id: forged.id } });
    expect(tampered.status).toBe(200);
    expect(tampered.body.verification).toMatchObject({ storedSha256: row.sha256, isIdentical: false });
  });
});

describe("GET /api/v1/records (40 CFR 273.39)", () => {
  test("the CSV has the fields of 273.39 for shipments received and sent; the PDF is an issued document", async () => {
    const s = await usLoad();
    await call(r.load.PATCH, { path: `/api/v1/loads/${s.load.id}`, method: "PATCH", key: s.keys.compliance, body: { state: "ready" }, ids: { id: s.load.id } });
    await call(r.depart.POST, { path: `/api/v1/loads/${s.load.id}/depart`, method: "POST", key: s.keys.compliance, body: {}, ids: { id: s.load.id } });
    const from = new Date(Date.now() - 30 * 86_400_000).toISOString().slice(0, 10);
    const res = await r.records.GET(apiRequest(`/api/v1/records?site=${s.site.id}&from=${from}&to=${today()}`, { key: s.keys.yard }));
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toContain("text/csv");
    const csv = await res.text();
    const lines = csv.trimEnd().split("\r\n");
    // REFERENCES.md, Storage: received — origin name and address, quantity by type, date; sent — destination name and address, quantity by type, date left
    expect(lines[0]).toBe("direction,date,counterpart_name,counterpart_address,type,count,mass_kg,mass_lb,reference");
    const rows = Papa.parse<string[]>(csv.trimEnd(), { newline: "\r\n" }).data.slice(1);
    const sent = rows.filter((x) => x[0] === "sent");
    const received = rows.filter((x) => x[0] === "received");
    expect(sent.map((x) => x[4]).sort()).toEqual(["lead-acid batteries", "lead-acid batteries", "lead-acid batteries"].map((t, i) => `${t}, ${["AGM 12 V (UN2800)", "Deep-cycle 12 V (UN2794)", "Flooded starting 12 V (UN2794)"][i]}`).sort());
    const floodedSent = lines.find((l) => l.startsWith("sent,") && l.includes("Flooded starting"))!;
    expect(floodedSent).toBe(`sent,${today()},${s.facility.name},"${s.facility.address.replace("\n", ", ")}","lead-acid batteries, Flooded starting 12 V (UN2794)",6,${(6 * 18.4).toFixed(1)},${((6 * 18.4) / 0.45359237).toFixed(1)},${s.load.reference}`);
    // the 11 units were logged 10 days ago from a fleet source, in one day's group per kind
    expect(received.length).toBe(3);
    expect(received.every((x) => x[1] === new Date(Date.now() - 10 * 86_400_000).toISOString().slice(0, 10))).toBe(true);
    expect(received.reduce((t, x) => t + Number(x[5]), 0)).toBe(11);
    expect(received.every((x) => x[2] === "Fleet returns (sender not recorded)")).toBe(true);

    expect((await r.records.GET(apiRequest(`/api/v1/records?site=${s.site.id}&from=${from}&to=${today()}&format=pdf`, { key: s.keys.yard }))).status).toBe(403);
    const pdf = await r.records.GET(apiRequest(`/api/v1/records?site=${s.site.id}&from=${from}&to=${today()}&format=pdf`, { key: s.keys.compliance }));
    expect(pdf.status).toBe(200);
    const bytes = Buffer.from(await pdf.arrayBuffer());
    const text = squash(pdfPages(bytes).join("\n"));
    expect(text).toContain("Shipments sent");
    expect(text).toContain(s.facility.name);
    expect(await db.document.count({ where: { siteId: s.site.id, kind: "records", sha256: sha256(bytes) } })).toBe(1);
  });

  test.each([
    ["to before from", "from=2026-03-01&to=2026-02-01", "to"],
    ["a period over three years", "from=2020-01-01&to=2026-01-01", "to"],
    ["no dates", "", "from"],
    ["an unknown format", "from=2026-01-01&to=2026-01-31&format=xls", "format"],
  ])("%s is a 400", async (_name, query, field) => {
    const s = await makeShippingSite(db);
    const res = await r.records.GET(apiRequest(`/api/v1/records?site=${s.site.id}&${query}`, { key: s.keys.compliance }));
    expect(res.status).toBe(400);
    expect((await res.json()).error.issues.map((i: { field: string }) => i.field)).toContain(field);
  });
});
