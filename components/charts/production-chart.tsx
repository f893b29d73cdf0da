'use client';

import { Bar, BarChart, CartesianGrid, Legend, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';

// Okabe–Ito: distinguishable under the common colour-vision deficiencies
const COLOURS = { sawn: '#0072b2', laid: '#d55e00', backfilled: '#56b4e9', restored: '#009e73' };

/**
 * Metres sawn, laid, backfilled and restored per day (all crews), as shown (corrections applied), in the
 * person's unit. `summary` says the same in words for a screen reader.
 */
export function ProductionChart({ data, unit, summary }: { data: { day: string; sawn: number; laid: number; backfilled: number; restored: number }[]; unit: string; summary: string }) {
  return (
    <figure className="w-full">
      <div className="h-72 w-full" aria-hidden="true">
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={data} margin={{ top: 8, right: 8, bottom: 8, left: 8 }}>
            <CartesianGrid strokeDasharray="3 3" stroke="#e5e7eb" />
            <XAxis dataKey="day" tick={{ fontSize: 12 }} />
            <YAxis tick={{ fontSize: 12 }} label={{ value: unit, angle: -90, position: 'insideLeft', fontSize: 12 }} />
            <Tooltip />
            <Legend />
            <Bar dataKey="sawn" name="Sawn" fill={COLOURS.sawn} />
            <Bar dataKey="laid" name="Laid" fill={COLOURS.laid} />
            <Bar dataKey="backfilled" name="Backfilled" fill={COLOURS.backfilled} />
            <Bar dataKey="restored" name="Restored" fill={COLOURS.restored} />
          </BarChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="text-sm text-ink-soft">{summary}</figcaption>
    </figure>
  );
}
