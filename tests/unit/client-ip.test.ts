import { describe, expect, it } from 'vitest';
import { parseProxyList, resolveClientIp } from '@/lib/auth/client-ip';

const none = parseProxyList('');

describe('the client address a request counts under', () => {
  it('is the socket peer when no proxy is configured, whatever X-Forwarded-For claims', () => {
    expect(resolveClientIp('203.0.113.9', {}, none)).toBe('203.0.113.9');
    expect(resolveClientIp('203.0.113.9', { 'x-forwarded-for': '198.51.100.1' }, none)).toBe('203.0.113.9');
    expect(resolveClientIp('203.0.113.9', { 'x-forwarded-for': '198.51.100.2, 10.0.0.1' }, none)).toBe('203.0.113.9');
  });

  it('tells clients without forwarded headers apart (no shared "unknown")', () => {
    expect(resolveClientIp('127.0.0.2', {}, none)).not.toBe(resolveClientIp('127.0.0.3', {}, none));
  });

  it('reads an IPv4 client on a dual-stack socket as plain IPv4', () => {
    expect(resolveClientIp('::ffff:192.0.2.10', {}, none)).toBe('192.0.2.10');
    expect(resolveClientIp('2001:db8::5', {}, none)).toBe('2001:db8::5');
  });

  it('behind a configured proxy, takes the right-most address that is not a trusted proxy', () => {
    const proxies = parseProxyList('10.0.0.0/8, 192.0.2.1');
    expect(resolveClientIp('10.0.0.2', { 'x-forwarded-for': '198.51.100.7' }, proxies)).toBe('198.51.100.7');
    // a client-supplied first hop is not believed: the proxy appended the address it saw
    expect(resolveClientIp('10.0.0.2', { 'x-forwarded-for': '1.2.3.4, 198.51.100.7' }, proxies)).toBe('198.51.100.7');
    // two proxies in a row
    expect(resolveClientIp('10.0.0.2', { 'x-forwarded-for': '198.51.100.7, 192.0.2.1' }, proxies)).toBe('198.51.100.7');
    // the proxy sent no header, or a malformed hop: the proxy itself counts
    expect(resolveClientIp('10.0.0.2', {}, proxies)).toBe('10.0.0.2');
    expect(resolveClientIp('10.0.0.2', { 'x-forwarded-for': 'not-an-ip' }, proxies)).toBe('10.0.0.2');
    // a peer that is not a configured proxy is itself the client
    expect(resolveClientIp('203.0.113.9', { 'x-forwarded-for': '198.51.100.7' }, proxies)).toBe('203.0.113.9');
  });

  it('refuses a malformed TRUSTED_PROXIES entry by name', () => {
    expect(() => parseProxyList('10.0.0.0/8, proxy.local')).toThrow(/proxy\.local/);
    expect(() => parseProxyList('10.0.0.0/33')).toThrow(/prefix/);
    expect(parseProxyList(' 2001:db8::/32 ').check('2001:db8::1', 'ipv6')).toBe(true);
  });
});
