import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { colourSequenceSchema } from '@/lib/records/catalogue-schemas';
import { addColourSequence } from '@/lib/services/catalogues';

// A new sequence; the project's choice of sequence is a setting (records.colourSequenceId, PATCH /api/projects/{id}).
export const POST = withRoute({ action: 'catalogue.manage', scope: byProjectParam, side: 'contractor', body: colourSequenceSchema }, async ({ db, principal, project, body }) =>
  NextResponse.json({ colourSequence: await addColourSequence(db, principal, project, body) }, { status: 201 }),
);
