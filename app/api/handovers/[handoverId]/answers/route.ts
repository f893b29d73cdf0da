import { NextResponse } from 'next/server';
import { byHandoverParam } from '@/lib/api/scopes';
import { withRoute } from '@/lib/api/with-route';
import { answerComments, answersSchema } from '@/lib/services/handover-reviews';

// The contractor's answers to the owner's comments on a returned package.
export const POST = withRoute({ action: 'handover.build', scope: byHandoverParam, side: 'contractor', body: answersSchema }, async ({ db, principal, project, params, body }) =>
  NextResponse.json({ handover: await answerComments(db, principal, project, params.handoverId, body) }, { status: 201 }),
);
