"use client";

import { CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import styles from "./limits.module.css";

export type TChartThreshold = { label: string; value: number; isWarning: boolean };

/** The most on hand each day of the year so far, with each limit (solid) and warning level (dashed) drawn across it. */
export function OnHandChart({ title, unit, points, thresholds }: { title: string; unit: string; points: { date: string; value: number }[]; thresholds: TChartThreshold[] }) {
  const top = Math.max(1, ...points.map((p) => p.value), ...thresholds.map((t) => t.value)) * 1.1;
  const highest = points.reduce((best, p) => (p.value > best.value ? p : best), { date: "", value: 0 });
  const format = (v: number) => v.toLocaleString("en-US", { maximumFractionDigits: v < 10 ? 1 : 0 });
  return (
    <figure className={styles.chart} aria-label={`${title}: daily amount on hand`}>
      <h3>{title}</h3>
      <div style={{ width: "100%", height: 210 }}>
        <ResponsiveContainer>
          <LineChart data={points} margin={{ top: 8, right: 16, bottom: 4, left: 8 }}>
            <CartesianGrid stroke="#d6cfbd" strokeDasharray="2 4" />
            <XAxis dataKey="date" tickFormatter={(d: string) => d.slice(5)} minTickGap={40} tick={{ fontSize: 11 }} />
            <YAxis domain={[0, top]} tickFormatter={format} tick={{ fontSize: 11 }} width={56} unit={` ${unit}`} />
            <Tooltip formatter={(v) => [`${format(Number(v))} ${unit}`, "on hand"]} />
            {thresholds.map((t) => (
              <ReferenceLine
                key={t.label}
                y={t.value}
                stroke={t.isWarning ? "#c77d0a" : "#9b3b26"}
                strokeWidth={t.isWarning ? 1.5 : 2}
                strokeDasharray={t.isWarning ? "6 4" : undefined}
                label={{ value: t.label, position: "insideTopRight", fontSize: 11, fill: "#23262b" }}
              />
            ))}
            <Line type="stepAfter" dataKey="value" stroke="#4b6275" strokeWidth={2} dot={false} isAnimationActive={false} />
          </LineChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="small muted">
        Highest so far: {format(highest.value)} {unit}
        {highest.date ? ` on ${highest.date}` : ""}.{" "}
        {thresholds.filter((t) => !t.isWarning).map((t) => `${t.label}: ${format(t.value)} ${unit}`).join("; ")}
      </figcaption>
    </figure>
  );
}
