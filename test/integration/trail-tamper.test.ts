// Trail events are append-only at the database: the triggers appended by hand to each init
// migration refuse UPDATE and DELETE (and TRUNCATE on PostgreSQL), whatever the code above does.
import { randomUUID } from "node:crypto";
import { describe, expect, test } from "vitest";
import { bothDatabases, clientFor } from "../helpers/db";

const targets = await bothDatabases("trail-tamper.test");

describe.each(targets)("trail events on $provider", (target) => {
  const { provider, skip } = target;
  const client = clientFor(target);

  async function insertEvent() {
    const tag = randomUUID().slice(0, 8);
    const organisation = await client().organisation.create({ data: { name: `Trail org ${tag}` } });
    return client().trailEvent.create({
      data: {
        organisationId: organisation.id,
        actor: "system",
        actorLabel: "tamper test",
        action: "unit.received",
        entity: "Unit",
        entityId: `unit-${tag}`,
        after: JSON.stringify({ batteryKg: 18 }),
      },
    });
  }

  const table = '"TrailEvent"';

  test.skipIf(skip)("a new event is stored", async () => {
    const event = await insertEvent();
    expect(await client().trailEvent.findUnique({ where: { id: event.id } })).toMatchObject({ action: "unit.received" });
  });

  test.skipIf(skip)("UPDATE is refused by the database and the event is unchanged", async () => {
    const event = await insertEvent();
    const param = provider === "postgresql" ? "$1" : "?";
    await expect(client().$executeRawUnsafe(`UPDATE ${table} SET "action" = 'forged' WHERE "id" = ${param}`, event.id)).rejects.toThrow(
      /append-only/,
    );
    await expect(client().trailEvent.update({ where: { id: event.id }, data: { after: "{}" } })).rejects.toThrow(/append-only/);
    expect(await client().trailEvent.findUniqueOrThrow({ where: { id: event.id } })).toMatchObject({ action: "unit.received", after: event.after });
  });

  test.skipIf(skip)("DELETE is refused by the database and the event is still there", async () => {
    const event = await insertEvent();
    const param = provider === "postgresql" ? "$1" : "?";
    await expect(client().$executeRawUnsafe(`DELETE FROM ${table} WHERE "id" = ${param}`, event.id)).rejects.toThrow(/append-only/);
    await expect(client().trailEvent.deleteMany({ where: { id: event.id } })).rejects.toThrow(/append-only/);
    expect(await client().trailEvent.count({ where: { id: event.id } })).toBe(1);
  });

  if (provider === "postgresql") {
    test.skipIf(skip)("TRUNCATE is refused too", async () => {
      const event = await insertEvent();
      await expect(client().$executeRawUnsafe(`TRUNCATE ${table}`)).rejects.toThrow(/append-only/);
      expect(await client().trailEvent.count({ where: { id: event.id } })).toBe(1);
    });
  }
});
