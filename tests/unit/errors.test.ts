import { describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { AppError, ERROR_CODES } from '@/lib/api/errors';
import { errorResponse } from '@/lib/api/with-route';

describe('one error shape', () => {
  it('maps each AppError code to its status from the one table', async () => {
    for (const [code, { status }] of Object.entries(ERROR_CODES)) {
      const res = errorResponse(new AppError(code as keyof typeof ERROR_CODES, `m-${code}`));
      expect(res.status).toBe(status);
      expect(await res.json()).toEqual({ error: { code, message: `m-${code}` } });
    }
  });

  it('answers a zod failure with 422, naming the field', async () => {
    const r = z.object({ name: z.string().min(3) }).safeParse({ name: 'x' });
    const res = errorResponse(r.error);
    expect(res.status).toBe(422);
    const body = await res.json();
    expect(body.error.code).toBe('invalid');
    expect(body.error.message).toMatch(/^name:/);
    expect(body.error.details[0].path).toBe('name');
  });

  it('hides unknown errors behind a logged generic 500', async () => {
    const log = vi.spyOn(console, 'error').mockImplementation(() => {});
    const res = errorResponse(new Error('secret internals'));
    expect(res.status).toBe(500);
    const body = await res.json();
    expect(body.error.code).toBe('internal');
    expect(JSON.stringify(body)).not.toContain('secret internals');
    expect(log).toHaveBeenCalled();
    log.mockRestore();
  });
});
