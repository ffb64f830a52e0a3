import { isIP } from 'node:net';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { normaliseAddress, trustedClientAddress, trustedProxyHops } from '@/lib/server/auth/client-address';

const socket = '10.0.0.5';

describe('TRUST_PROXY', () => {
  it('is 0 when unset or empty, else a whole number of hops from 0 to 16 (inclusive)', () => {
    expect(trustedProxyHops(undefined)).toBe(0);
    expect(trustedProxyHops('')).toBe(0);
    expect(trustedProxyHops(' 2 ')).toBe(2);
    expect(trustedProxyHops('16')).toBe(16);
    for (const bad of ['17', 'true', 'yes', '-1', '1.5', 'loopback'])
      expect(() => trustedProxyHops(bad), bad).toThrow(/TRUST_PROXY/);
  });
});

describe('the trusted client address', () => {
  it('with no trusted proxy is the socket address, whatever X-Forwarded-For says', () => {
    expect(trustedClientAddress(socket, '203.0.113.9', 0)).toBe(socket);
    expect(trustedClientAddress(socket, 'garbage', 0)).toBe(socket);
    expect(trustedClientAddress('::ffff:192.0.2.44', undefined, 0)).toBe('192.0.2.44');
  });

  it('with N proxies is the Nth entry from the right', () => {
    const header = '198.51.100.1, 203.0.113.2, 192.0.2.3';
    expect(trustedClientAddress(socket, header, 1)).toBe('192.0.2.3');
    expect(trustedClientAddress(socket, header, 2)).toBe('203.0.113.2');
    expect(trustedClientAddress(socket, header, 3)).toBe('198.51.100.1');
    // Fewer entries than proxies: the left-most one.
    expect(trustedClientAddress(socket, header, 5)).toBe('198.51.100.1');
    // A header sent twice arrives as two values.
    expect(trustedClientAddress(socket, ['198.51.100.1', '192.0.2.3'], 1)).toBe('192.0.2.3');
  });

  it('falls back to the socket address when the header is missing or its entry is not an address', () => {
    expect(trustedClientAddress(socket, undefined, 1)).toBe(socket);
    expect(trustedClientAddress(socket, '', 1)).toBe(socket);
    expect(trustedClientAddress(socket, '198.51.100.1, unknown', 1)).toBe(socket);
    expect(trustedClientAddress(socket, '<script>', 1)).toBe(socket);
  });

  it('normalises IPv4-mapped IPv6, ports, zones and case, and refuses anything that is not an IP address', () => {
    expect(normaliseAddress('::FFFF:192.0.2.7')).toBe('192.0.2.7');
    expect(normaliseAddress('192.0.2.7:8080')).toBe('192.0.2.7');
    expect(normaliseAddress('[2001:DB8::1]:443')).toBe('2001:db8::1');
    expect(normaliseAddress('fe80::1%eth0')).toBe('fe80::1');
    for (const bad of ['999.1.1.1', 'localhost', '1.2.3', '', '2001:db8::g', "1.2.3.4'; drop table x;--"])
      expect(normaliseAddress(bad), bad).toBeNull();
  });

  it('is never anything but an IP address or null, whatever the header holds', () => {
    fc.assert(
      fc.property(
        fc.string(),
        fc.option(fc.string(), { nil: undefined }),
        fc.integer({ min: 0, max: 16 }),
        (forwarded, raw, hops) => {
          const address = trustedClientAddress(raw, forwarded, hops);
          expect(address === null || isIP(address) !== 0).toBe(true);
        },
      ),
    );
  });
});
