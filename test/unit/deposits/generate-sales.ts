import { createWriteStream } from "node:fs";
import { once } from "node:events";

const GROUPS = ["24F", "35", "H6", "65", "", "27"];
const PRODUCTS = ["Starter 12 V", "Starter 12 V, heavy duty", "Deep cycle 12 V", "Powersport 12 V"];

/**
 * Writes an invented sales file of `rowCount` valid lines (header first) and returns its size in bytes.
 * Every sale id is unique; some products carry a comma and are quoted; the deposit is $15 a battery.
 */
export async function writeSalesFile(filePath: string, rowCount: number): Promise<number> {
  const out = createWriteStream(filePath);
  let bytes = 0;
  const write = async (text: string) => {
    bytes += Buffer.byteLength(text);
    if (!out.write(text)) await once(out, "drain");
  };
  await write("date,sale_id,product,group_size,quantity,deposit\n");
  let block = "";
  for (let i = 0; i < rowCount; i++) {
    const month = String(1 + (i % 12)).padStart(2, "0");
    const day = String(1 + (i % 28)).padStart(2, "0");
    const product = `${PRODUCTS[i % PRODUCTS.length]} ${40 + (i % 60)} Ah`;
    const quantity = 1 + (i % 4);
    block += `2025-${month}-${day},S-${i},${product.includes(",") ? `"${product}"` : product},${GROUPS[i % GROUPS.length]},${quantity},${(15 * quantity).toFixed(2)}\n`;
    if (block.length > 64 * 1024) {
      await write(block);
      block = "";
    }
  }
  await write(block);
  out.end();
  await once(out, "finish");
  return bytes;
}
