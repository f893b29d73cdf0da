import { withRoute } from '@/lib/api/with-route';
import { byCorrectionParam } from '@/lib/api/scopes';
import { publicJob } from '@/db/jobs';
import { withdrawSectionCorrection } from '@/lib/services/corrections';

// Withdraws a correction: audited, and the project is reconciled again without it.
export const DELETE = withRoute({ action: 'section.correct', scope: byCorrectionParam }, async ({ db, principal, project, params }) => {
  const { correction, job } = await withdrawSectionCorrection(db, principal, project.id, Number(params.correctionId));
  return { correction, job: publicJob(job) };
});
