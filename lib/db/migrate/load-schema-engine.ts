import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import * as bg from "@prisma/schema-engine-wasm/schema_engine_bg";

export type TSchemaEngine = bg.SchemaEngine;
export type TSchemaEngineClass = typeof bg.SchemaEngine;

let loaded: TSchemaEngineClass | undefined;

/**
 * The WASM schema engine, instantiated by hand: the package's ESM entry imports the `.wasm` file
 * directly, which Node 20 refuses.
 */
export function loadSchemaEngine(): TSchemaEngineClass {
  if (loaded) return loaded;
  const require = createRequire(import.meta.url);
  const dir = path.dirname(require.resolve("@prisma/schema-engine-wasm/schema_engine_bg"));
  const bytes = readFileSync(path.join(dir, "schema_engine_bg.wasm"));
  const instance = new WebAssembly.Instance(new WebAssembly.Module(bytes), {
    "./schema_engine_bg.js": bg as unknown as WebAssembly.ModuleImports,
  });
  const exports = instance.exports as WebAssembly.Exports & { __wbindgen_start?: () => void };
  bg.__wbg_set_wasm(exports);
  exports.__wbindgen_start?.();
  loaded = bg.SchemaEngine;
  return loaded;
}
