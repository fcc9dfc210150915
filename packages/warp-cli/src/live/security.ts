/**
 * Who may talk to the live server: a request must carry the server's random token, name this server
 * in its Host header (a page from another site that rebinds its DNS name to 127.0.0.1 sends its own
 * name, so it is refused), and, when a browser says where the request comes from (Origin), come from
 * this server's own page. Vite's dev server (`server.allowedHosts`) and a notebook server's token work
 * the same way (common practice for local servers).
 */
import { randomBytes, timingSafeEqual } from 'node:crypto';
import { isIP } from 'node:net';
import { networkInterfaces } from 'node:os';
import type { IncomingMessage } from 'node:http';

/** 16 random bytes, 32 hex digits: 128 bits, beyond guessing (OWASP: session ids of at least 64 bits of entropy). */
export function newToken(): string {
  return randomBytes(16).toString('hex');
}

/** True when a and b are equal, in time that does not depend on where they first differ. */
export function sameToken(given: string | null, token: string): boolean {
  const expected = Buffer.from(token, 'utf8');
  const actual = Buffer.from(given ?? '', 'utf8');
  // compare equal lengths only (timingSafeEqual throws otherwise); a wrong length still costs one comparison
  if (actual.length !== expected.length) {
    timingSafeEqual(expected, expected);
    return false;
  }
  return timingSafeEqual(actual, expected);
}

/** Addresses that reach only this machine. */
export function isLoopback(host: string): boolean {
  const h = host.replace(/^\[|\]$/g, '').toLowerCase();
  return h === 'localhost' || h === '::1' || /^127(\.\d{1,3}){3}$/.test(h);
}

/** A bind address that listens on every interface. */
export function isWildcard(host: string): boolean {
  const h = host.replace(/^\[|\]$/g, '');
  return h === '0.0.0.0' || h === '::';
}

/** An address as it stands in a Host header or URL: IPv6 in brackets (RFC 3986, 3.2.2). */
export function hostForUrl(host: string): string {
  const h = host.replace(/^\[|\]$/g, '');
  return isIP(h) === 6 ? `[${h}]` : h;
}

/**
 * The Host header values (lower case, with the port) this server answers to: the loopback names, the
 * --host value, and for a wildcard bind every address of this machine's interfaces (IP literals: no
 * DNS name another site could point here).
 */
export function allowedHosts(bind: string, port: number): Set<string> {
  const names = new Set(['127.0.0.1', 'localhost', '[::1]', hostForUrl(bind).toLowerCase()]);
  if (isWildcard(bind)) {
    for (const list of Object.values(networkInterfaces())) for (const a of list ?? []) names.add(hostForUrl(a.address).toLowerCase());
  }
  return new Set([...names].map((n) => `${n}:${port}`));
}

/** Why a request is refused (the 403's message), or null when it may go on. */
export function refusal(req: IncomingMessage, url: URL, token: string, hosts: ReadonlySet<string>): string | null {
  const host = (req.headers.host ?? '').toLowerCase();
  if (!hosts.has(host)) return 'this server answers only to its own address (Host header)';
  const origin = req.headers.origin;
  if (origin !== undefined && !(origin.toLowerCase().startsWith('http://') && hosts.has(origin.toLowerCase().slice('http://'.length)))) {
    return 'requests from other sites are refused (Origin header)';
  }
  // a browser marks a request another site started (Fetch Metadata, W3C); none is allowed
  if (req.headers['sec-fetch-site'] === 'cross-site') return 'requests from other sites are refused (Sec-Fetch-Site header)';
  const given = url.searchParams.getAll('t');
  if (given.length !== 1 || !sameToken(given[0], token)) return 'missing or wrong token: open the URL skyfold live printed';
  return null;
}
