import { listHandoverSummaries } from '@/db/handover-reviews';
import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { createHandover, createHandoverSchema } from '@/lib/services/handovers';

// A project's handover packages, newest revision first: status, file, review, comments and answers.
export const GET = withRoute({ action: 'handover.read', scope: byProjectParam }, async ({ db, project }) => {
  const handovers = await listHandoverSummaries(db, project.id);
  return {
    handovers: handovers.map((h) => ({
      ...h,
      counts: {
        comments: h.comments.filter((c) => c.kind === 'return').length,
        answers: h.comments.filter((c) => c.kind === 'answer').length,
        open: h.comments.filter((c) => c.kind === 'return' && !h.comments.some((a) => a.answersId === c.id)).length,
      },
    })),
  };
});

// Builds the next revision: 202 with the package (status building) and its job; the job issues it or fails it.
export const POST = withRoute({ action: 'handover.build', scope: byProjectParam, side: 'contractor', body: createHandoverSchema }, async ({ db, principal, project, body }) =>
  NextResponse.json(await createHandover(db, principal, project, body), { status: 202 }),
);
