'use client';

export type ApiResult<T> =
  | { ok: true; data: T; status: number }
  | { ok: false; status: number; message: string; fieldErrors: Record<string, string> };

/** Calls a Trenchbook API route with the session cookie and turns the error shape into field errors. */
export async function callApi<T>(url: string, method: string, body?: unknown): Promise<ApiResult<T>> {
  let res: Response;
  try {
    res = await fetch(url, {
      method,
      headers: body === undefined ? undefined : { 'content-type': 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  } catch {
    return { ok: false, status: 0, message: 'The server could not be reached. Check your connection.', fieldErrors: {} };
  }
  const json = await res.json().catch(() => null);
  if (res.ok) return { ok: true, data: json as T, status: res.status };
  const err = (json as { error?: { message?: string; details?: unknown } } | null)?.error;
  const fieldErrors: Record<string, string> = {};
  if (Array.isArray(err?.details)) {
    for (const d of err.details as { path?: string; message?: string }[]) {
      const key = (d.path ?? '').split('.')[0];
      if (key && d.message && !fieldErrors[key]) fieldErrors[key] = d.message;
    }
  }
  return { ok: false, status: res.status, message: err?.message ?? `Request failed (${res.status}).`, fieldErrors };
}
