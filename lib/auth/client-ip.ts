/** The client address from proxy headers (first hop of X-Forwarded-For), else 'unknown'. */
export function clientIp(headers: Record<string, string | string[] | undefined> | Headers): string {
  const get = (name: string): string | undefined => {
    if (headers instanceof Headers) return headers.get(name) ?? undefined;
    const v = headers[name];
    return Array.isArray(v) ? v[0] : v;
  };
  const forwarded = get('x-forwarded-for')?.split(',')[0]?.trim();
  return forwarded || get('x-real-ip')?.trim() || 'unknown';
}
