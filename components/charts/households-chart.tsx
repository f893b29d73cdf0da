'use client';

import { CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';

// Okabe–Ito, the same as the households map: distinguishable under the common colour-vision deficiencies;
// the lines differ by dash too
const COLOURS = { served: '#999999', passed: '#009e73', approved: '#cc79a7', connected: '#0072b2' };

/** Households served, passed, passed and approved, and connected per day. `summary` says it in words. */
export function HouseholdsChart({ data, summary }: { data: { day: string; served: number; passed: number; approved: number; connected: number }[]; summary: string }) {
  return (
    <figure className="w-full">
      <div className="h-64 w-full" aria-hidden="true">
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={data} margin={{ top: 8, right: 8, bottom: 8, left: 0 }}>
            <CartesianGrid strokeDasharray="3 3" stroke="#e5e7eb" />
            <XAxis dataKey="day" tick={{ fontSize: 12 }} />
            <YAxis tick={{ fontSize: 12 }} allowDecimals={false} />
            <Tooltip />
            <Legend />
            <Line type="stepAfter" dataKey="served" name="Served by the plan" stroke={COLOURS.served} strokeDasharray="2 3" dot={false} />
            <Line type="stepAfter" dataKey="passed" name="Passed" stroke={COLOURS.passed} strokeWidth={2} />
            <Line type="stepAfter" dataKey="approved" name="Passed and approved" stroke={COLOURS.approved} strokeDasharray="6 3" />
            <Line type="stepAfter" dataKey="connected" name="Connected" stroke={COLOURS.connected} strokeWidth={2} strokeDasharray="1 2" />
          </LineChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="text-sm text-ink-soft">{summary}</figcaption>
    </figure>
  );
}
