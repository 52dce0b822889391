// Issued documents are append-only at the database, like trail events: the triggers appended by hand to the
// shipment_senders_document_append_only migration refuse UPDATE and DELETE (and TRUNCATE on PostgreSQL).
// A stored document is the proof of what was issued (issue #5, Retention: "Store a hash of each issued document").
import { randomUUID } from "node:crypto";
import { describe, expect, test } from "vitest";
import { bothDatabases, clientFor } from "../helpers/db";

const targets = await bothDatabases("document-append-only.test");

describe.each(targets)("issued documents on $provider", (target) => {
  const { provider, skip } = target;
  const client = clientFor(target);

  async function issueDocument() {
    const tag = randomUUID().slice(0, 8);
    const organisation = await client().organisation.create({ data: { name: `Document org ${tag}` } });
    const site = await client().site.create({ data: { organisationId: organisation.id, name: `Document site ${tag}`, kind: "yard" } });
    return client().document.create({
      data: {
        siteId: site.id,
        kind: "records",
        rulebookId: "us-federal",
        rulebookVersion: "test",
        input: JSON.stringify({ from: "2026-01-01", to: "2026-01-31", tag }),
        sha256: "a".repeat(64),
        issuedBy: "test",
      },
    });
  }

  const table = '"Document"';
  const param = provider === "postgresql" ? "$1" : "?";

  test.skipIf(skip)("a new document is stored", async () => {
    const document = await issueDocument();
    expect(await client().document.findUnique({ where: { id: document.id } })).toMatchObject({ kind: "records", sha256: "a".repeat(64) });
  });

  test.skipIf(skip)("UPDATE is refused by the database and the document is unchanged", async () => {
    const document = await issueDocument();
    await expect(client().$executeRawUnsafe(`UPDATE ${table} SET "sha256" = 'forged' WHERE "id" = ${param}`, document.id)).rejects.toThrow(/append-only/);
    await expect(client().document.update({ where: { id: document.id }, data: { input: "{}" } })).rejects.toThrow(/append-only/);
    await expect(client().document.updateMany({ where: { siteId: document.siteId }, data: { issuedBy: "someone else" } })).rejects.toThrow(/append-only/);
    expect(await client().document.findUniqueOrThrow({ where: { id: document.id } })).toEqual(document);
  });

  test.skipIf(skip)("DELETE is refused by the database and the document is still there", async () => {
    const document = await issueDocument();
    await expect(client().$executeRawUnsafe(`DELETE FROM ${table} WHERE "id" = ${param}`, document.id)).rejects.toThrow(/append-only/);
    await expect(client().document.delete({ where: { id: document.id } })).rejects.toThrow(/append-only/);
    await expect(client().document.deleteMany({ where: { id: document.id } })).rejects.toThrow(/append-only/);
    expect(await client().document.count({ where: { id: document.id } })).toBe(1);
  });

  if (provider === "postgresql") {
    test.skipIf(skip)("TRUNCATE is refused too", async () => {
      const document = await issueDocument();
      await expect(client().$executeRawUnsafe(`TRUNCATE ${table}`)).rejects.toThrow(/append-only/);
      expect(await client().document.count({ where: { id: document.id } })).toBe(1);
    });
  }
});
