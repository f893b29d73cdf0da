import { listHandoverSummaries } from '@/db/handover-reviews';
import { byProjectParam, withRoute } from '@/lib/api/with-route';

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
