/**
 * Where e-mailed links point: AUTH_URL, else PUBLIC_URL, else the listening address; nothing a
 * request says can change it (linkOrigin takes no request at all).
 */
import { afterEach, describe, expect, it } from 'vitest';
import { linkOrigin, listeningOrigin } from '@/lib/server/auth/public-origin';

const saved = {
  AUTH_URL: process.env.AUTH_URL,
  PUBLIC_URL: process.env.PUBLIC_URL,
  HOST: process.env.HOST,
  PORT: process.env.PORT,
  SERVER_CERT_PATH: process.env.SERVER_CERT_PATH,
  SERVER_KEY_PATH: process.env.SERVER_KEY_PATH,
};

afterEach(() => {
  for (const [name, value] of Object.entries(saved)) {
    if (value === undefined) delete process.env[name];
    else process.env[name] = value;
  }
});

describe('linkOrigin', () => {
  it('prefers AUTH_URL, then PUBLIC_URL, keeping only the origin', () => {
    process.env.AUTH_URL = 'https://gates.example.test/some/path';
    process.env.PUBLIC_URL = 'https://other.example.test';
    expect(linkOrigin()).toBe('https://gates.example.test');
    delete process.env.AUTH_URL;
    expect(linkOrigin()).toBe('https://other.example.test');
    process.env.AUTH_URL = '';
    expect(linkOrigin()).toBe('https://other.example.test');
  });

  it('falls back to the listening address when neither is set', () => {
    delete process.env.AUTH_URL;
    delete process.env.PUBLIC_URL;
    process.env.HOST = '127.0.0.1';
    process.env.PORT = '44999';
    expect(linkOrigin()).toBe('http://127.0.0.1:44999');
    delete process.env.HOST;
    delete process.env.PORT;
    expect(linkOrigin()).toBe('http://127.0.0.1:4321');
  });
});

describe('listeningOrigin', () => {
  it('says https when the server answers TLS itself (SERVER_CERT_PATH and SERVER_KEY_PATH)', () => {
    delete process.env.AUTH_URL;
    delete process.env.PUBLIC_URL;
    process.env.HOST = '127.0.0.1';
    process.env.PORT = '44999';
    process.env.SERVER_CERT_PATH = '/etc/latchwell/cert.pem';
    expect(linkOrigin()).toBe('http://127.0.0.1:44999'); // a certificate without its key serves plain HTTP
    process.env.SERVER_KEY_PATH = '/etc/latchwell/key.pem';
    expect(linkOrigin()).toBe('https://127.0.0.1:44999');
    expect(listeningOrigin('gates.internal', '443')).toBe('https://gates.internal');
    expect(listeningOrigin('gates.internal', '443', false)).toBe('http://gates.internal:443');
  });

  it('reaches a wildcard address on loopback and brackets IPv6', () => {
    expect(listeningOrigin('0.0.0.0', 8080)).toBe('http://127.0.0.1:8080');
    expect(listeningOrigin('::', 8080)).toBe('http://127.0.0.1:8080');
    expect(listeningOrigin('::1', 8080)).toBe('http://[::1]:8080');
    expect(listeningOrigin('gates.internal', '80')).toBe('http://gates.internal');
  });
});
