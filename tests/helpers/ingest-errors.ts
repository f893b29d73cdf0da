import { IngestError } from '@/lib/ingest';

/** The IngestError a synchronous call throws; fails the test when it throws nothing or something else. */
export function ingestError(fn: () => unknown): IngestError {
  try {
    fn();
  } catch (e) {
    if (e instanceof IngestError) return e;
    throw e;
  }
  throw new Error('expected an IngestError');
}

/** The IngestError an asynchronous call rejects with. */
export async function ingestErrorAsync(fn: () => unknown): Promise<IngestError> {
  try {
    await fn();
  } catch (e) {
    if (e instanceof IngestError) return e;
    throw e;
  }
  throw new Error('expected an IngestError');
}
