"use client";

import { Bar, CartesianGrid, ComposedChart, Legend, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";

type TRow = { month: string; soldQuantity: number; returnedQuantity: number; ratio: number | null };

/** Batteries sold and returned per month as bars, the returned-per-sold share as a line on its own axis. */
export function ReturnsChart({ rows }: { rows: TRow[] }) {
  const data = rows.map((r) => ({ ...r, ratioPct: r.ratio === null ? null : Math.round(r.ratio * 1000) / 10 }));
  return (
    <div role="img" aria-label="Batteries sold and returned by month, with the share returned" style={{ width: "100%", height: 280 }}>
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} margin={{ top: 10, right: 16, bottom: 4, left: 0 }}>
          <CartesianGrid stroke="#d6cfbd" strokeDasharray="3 3" />
          <XAxis dataKey="month" tick={{ fontSize: 12 }} />
          <YAxis yAxisId="count" allowDecimals={false} tick={{ fontSize: 12 }} label={{ value: "batteries", angle: -90, position: "insideLeft", fontSize: 12 }} />
          <YAxis yAxisId="pct" orientation="right" domain={[0, "auto"]} tick={{ fontSize: 12 }} unit=" %" />
          <Tooltip />
          <Legend />
          <Bar yAxisId="count" dataKey="soldQuantity" name="Sold" fill="#4b6275" isAnimationActive={false} />
          <Bar yAxisId="count" dataKey="returnedQuantity" name="Returned" fill="#3f6f5a" isAnimationActive={false} />
          <Line yAxisId="pct" dataKey="ratioPct" name="Returned per sold (%)" stroke="#b88a05" strokeWidth={2} dot={{ r: 3 }} connectNulls isAnimationActive={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}
