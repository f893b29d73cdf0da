import { NextResponse } from 'next/server';
import { withRoute } from '@/lib/api/with-route';
import { bySectionParam } from '@/lib/api/scopes';
import { publicJob } from '@/db/jobs';
import { correctionSchema, correctSection } from '@/lib/services/corrections';

// An engineer's correction: split, merge, reassign, count built on another source, promote, or say why not built.
export const POST = withRoute({ action: 'section.correct', scope: bySectionParam, body: correctionSchema }, async ({ db, principal, params, body }) => {
  const { correction, job } = await correctSection(db, principal, params.sectionId, body);
  return NextResponse.json({ correction, job: publicJob(job) }, { status: 202 });
});
