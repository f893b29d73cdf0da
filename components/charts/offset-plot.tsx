'use client';

import { CartesianGrid, ComposedChart, Legend, Line, ReferenceArea, ReferenceLine, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from 'recharts';

export interface OffsetSeries {
  label: string;
  /** `time`: when the fix was taken, already written on the project's clock */
  points: { chainageM: number; offsetM: number; time?: string | null }[];
}

/** What pointing at an observation tells: where, how far off, and when, so a stretch can be picked by time. */
function ObservationTip({ active, payload }: { active?: boolean; payload?: { payload?: { chainageM?: number; offsetM?: number; time?: string | null } }[] }) {
  const p = active ? payload?.[0]?.payload : undefined;
  if (!p || p.chainageM === undefined || p.offsetM === undefined) return null;
  return (
    <div className="rounded border border-ink/15 bg-white px-2 py-1 text-xs shadow">
      <div>chainage {p.chainageM.toFixed(1)} m, offset {p.offsetM.toFixed(2)} m</div>
      {p.time && <div className="tabular-nums">{p.time}</div>}
    </div>
  );
}

// Okabe–Ito: distinguishable under the common colour-vision deficiencies; status colours are kept for the map
const SERIES_COLOURS = ['#0072b2', '#d55e00', '#56b4e9', '#cc79a7', '#f0e442', '#000000'];

/**
 * Lateral offset of each matched observation from the planned route against chainage, with the project's
 * tolerance as a band around the plan and the section's as-built line drawn through them.
 */
export function OffsetPlot({ series, asBuilt, toleranceM, fromM, toM, section, summary }: { series: OffsetSeries[]; asBuilt: { chainageM: number; offsetM: number }[]; toleranceM: number; fromM: number; toM: number; section?: [number, number]; summary: string }) {
  // the axis spans most observations, not the wildest: a few fixes of a turn 15 m off the route would
  // otherwise squeeze the tolerance band to a hairline. It always shows the band at a third of the height or more.
  // Scaled on the section's own observations (the margins either side may hold a turn onto another street).
  const observed = Float64Array.from(series.flatMap((s) => s.points.map((p) => Math.abs(p.offsetM)))).sort();
  const own = Float64Array.from(series.flatMap((s) => s.points.filter((p) => !section || (p.chainageM >= section[0] && p.chainageM <= section[1])).map((p) => Math.abs(p.offsetM)))).sort();
  const typical = own.length ? own[Math.min(own.length - 1, Math.floor(0.95 * own.length))] * 1.25 : 0;
  const span = Math.max(1, 3 * toleranceM, typical, ...asBuilt.map((p) => Math.abs(p.offsetM)));
  // symmetric ticks on a 1–2–5 step, so that 0 (the plan) and the tolerance read off at a glance
  const raw = (span * 1.1) / 3;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((k) => k * mag).find((x) => x >= raw)!;
  const lim = Math.ceil((span * 1.1) / step) * step;
  const ticks = Array.from({ length: Math.round((2 * lim) / step) + 1 }, (_, i) => Math.round((-lim + i * step) * 1e6) / 1e6);
  let beyond = 0;
  for (let i = observed.length - 1; i >= 0 && observed[i] > lim; i--) beyond++;
  return (
    <figure role="img" aria-label={`Offset from the plan against chainage. ${summary}`} className="w-full">
      <div className="h-72 w-full">
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart margin={{ top: 8, right: 16, bottom: 24, left: 8 }}>
            <CartesianGrid stroke="#e5e7eb" />
            <XAxis type="number" dataKey="chainageM" domain={[Math.floor(fromM), Math.ceil(toM)]} allowDataOverflow tickFormatter={(v: number) => `${v} m`} label={{ value: 'chainage along the planned route (m)', position: 'insideBottom', offset: -12, fontSize: 12 }} fontSize={12} />
            <YAxis type="number" dataKey="offsetM" domain={[-lim, lim]} ticks={ticks} allowDataOverflow tickFormatter={(v: number) => (step < 1 ? v.toFixed(1) : String(v))} label={{ value: 'offset, + left (m)', angle: -90, position: 'insideLeft', fontSize: 12 }} fontSize={12} width={56} />
            {/* the band spans the plotted chainages explicitly and is edged by lines, so it shows however pale the fill */}
            <ReferenceArea x1={Math.floor(fromM)} x2={Math.ceil(toM)} y1={-toleranceM} y2={toleranceM} fill="#009e73" fillOpacity={0.18} stroke="none" ifOverflow="hidden" />
            <ReferenceLine y={toleranceM} stroke="#009e73" strokeWidth={1.5} strokeDasharray="3 3" label={{ value: `+${toleranceM} m tolerance`, position: 'insideTopRight', fontSize: 11, fill: '#00664a' }} />
            <ReferenceLine y={-toleranceM} stroke="#009e73" strokeWidth={1.5} strokeDasharray="3 3" label={{ value: `−${toleranceM} m tolerance`, position: 'insideBottomRight', fontSize: 11, fill: '#00664a' }} />
            <ReferenceLine y={0} stroke="#0072b2" strokeDasharray="6 4" label={{ value: 'plan', position: 'insideTopLeft', fontSize: 11 }} />
            <Tooltip content={<ObservationTip />} />
            <Legend verticalAlign="top" height={28} wrapperStyle={{ fontSize: 12 }} />
            {series.map((s, i) => (
              <Scatter key={s.label} name={s.label} data={s.points} fill={SERIES_COLOURS[i % SERIES_COLOURS.length]} isAnimationActive={false} shape="circle" legendType="circle" r={2} />
            ))}
            {asBuilt.length > 1 && <Line name="as-built line" data={asBuilt} dataKey="offsetM" stroke="#000000" strokeWidth={2} dot={false} isAnimationActive={false} type="linear" />}
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="mt-1 text-xs text-ink-soft">
        Green band between the dashed green lines: the project&apos;s lateral tolerance of ±{toleranceM} m around the plan. {summary}
        {beyond > 0 && ` ${beyond} observation${beyond === 1 ? '' : 's'} beyond ±${lim} m lie${beyond === 1 ? 's' : ''} off the plot's edge.`}
      </figcaption>
    </figure>
  );
}
