// How the Trail screen shows before/after values (app/trail/change-list.tsx): pure, no database.
import { describe, expect, test } from "vitest";
import { changeLines } from "@/app/trail/change-list";

describe("changeLines", () => {
  test.each([
    ["a change shows only the fields that differ", { role: "yard", email: "a@x" }, { role: "compliance", email: "a@x" }, [{ field: "role", before: "yard", after: "compliance", kind: "changed" }]],
    ["a field that appears", { name: "A" }, { name: "A", address: "1 Road" }, [{ field: "address", before: undefined, after: "1 Road", kind: "changed" }]],
    ["a new record lists its values", null, { batteryKg: 18, kind: "agm" }, [{ field: "batteryKg", after: 18, kind: "set" }, { field: "kind", after: "agm", kind: "set" }]],
    ["a removed record lists what it was", { role: "clerk" }, null, [{ field: "role", before: "clerk", kind: "removed" }]],
    ["nested values compare by content", { mix: [{ k: 1 }] }, { mix: [{ k: 1 }] }, []],
    ["plain values on both sides", "old", "new", [{ field: "before", before: "old", kind: "removed" }, { field: "after", after: "new", kind: "set" }]],
    ["nothing on either side", null, null, []],
  ])("%s (common practice)", (_label, before, after, expected) => {
    expect(changeLines(before, after)).toEqual(expected);
  });
});
