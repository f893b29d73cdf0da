import { describe, expect, it } from 'vitest';
import type { UnfinishedJob } from '@/db/jobs';
import { stuckReason } from '@/lib/jobs/settle';

const now = new Date('2026-12-05T10:00:00Z');
const ago = (s: number) => new Date(now.getTime() - s * 1000);
const job = (j: Partial<UnfinishedJob>): UnfinishedJob => ({ id: 'j', kind: 'reconcile', status: 'running', queueJobId: 'q', createdAt: ago(600), heartbeatAt: null, startedAt: null, now, ...j });

describe('which unfinished jobs can never finish', () => {
  it('leaves a running job alone while its heartbeat is fresh, whatever the queue says', () => {
    for (const state of ['active', 'failed', 'completed', 'missing'] as const) {
      expect(stuckReason(job({ heartbeatAt: ago(25), startedAt: ago(300) }), { state }, 10)).toBeUndefined();
    }
  });

  it('fails a running job silent for more than three heartbeats, saying when it was last seen', () => {
    const reason = stuckReason(job({ heartbeatAt: ago(31), startedAt: ago(300) }), { state: 'active' }, 10);
    expect(reason).toMatch(/worker or the database went away/);
    expect(reason).toContain(ago(31).toISOString().slice(0, 19));
    // no heartbeat at all (a row from before heartbeats): its start counts
    expect(stuckReason(job({ startedAt: ago(40) }), { state: 'active' }, 10)).toBeDefined();
  });

  it('leaves a queued job alone while the queue still holds it', () => {
    expect(stuckReason(job({ status: 'queued' }), { state: 'created' }, 10)).toBeUndefined();
    expect(stuckReason(job({ status: 'queued' }), { state: 'retry' }, 10)).toBeUndefined();
    expect(stuckReason(job({ status: 'queued' }), { state: 'active', startedOn: ago(5) }, 10)).toBeUndefined();
  });

  it('fails a queued job whose queue copy failed, finished, vanished, or was taken by a worker that died', () => {
    expect(stuckReason(job({ status: 'queued' }), { state: 'failed' }, 10)).toMatch(/failed by the queue/);
    expect(stuckReason(job({ status: 'queued' }), { state: 'cancelled' }, 10)).toMatch(/cancelled/);
    expect(stuckReason(job({ status: 'queued' }), { state: 'missing' }, 10)).toMatch(/no longer in the queue/);
    expect(stuckReason(job({ status: 'queued' }), { state: 'active', startedOn: ago(120) }, 10)).toMatch(/stopped before starting/);
  });

  it('gives a just-made queued job time to reach the queue', () => {
    expect(stuckReason(job({ status: 'queued', createdAt: ago(5), queueJobId: null }), { state: 'missing' }, 10)).toBeUndefined();
    expect(stuckReason(job({ status: 'queued', createdAt: ago(120), queueJobId: null }), { state: 'missing' }, 10)).toBeDefined();
  });
});
