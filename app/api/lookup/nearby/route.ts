import { NextResponse } from 'next/server';
import { withRoute } from '@/lib/api/with-route';
import { lookupParams } from '@/lib/api/lookup-params';
import { lookupNearby, nearbyGeoJson, nearbyQuery } from '@/lib/services/lookup';

// the stretches of the organisation's own projects near a spot, nearest first; another organisation's never
export const GET = withRoute({ action: 'lookup.read' }, async ({ req, db, principal }) => {
  const query = lookupParams(req, nearbyQuery);
  const r = await lookupNearby(db, principal, query);
  if (query.format === 'geojson') return NextResponse.json(nearbyGeoJson(r), { headers: { 'content-type': 'application/geo+json' } });
  return r;
});
