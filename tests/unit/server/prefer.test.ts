import { describe, expect, it } from 'vitest';
import { preferenceHeaders, returnPreference } from '@/lib/server/http/prefer';

const withPrefer = (...values: string[]) => {
  const headers = new Headers();
  for (const value of values) headers.append('prefer', value);
  return new Request('http://localhost/api/assessments/x', { method: 'PATCH', headers });
};

describe('Prefer: return (RFC 7240) on a change', () => {
  it('reads return=minimal, in any case of the token, beside other preferences and in a later header', () => {
    expect(returnPreference(withPrefer('return=minimal'))).toBe('minimal');
    expect(returnPreference(withPrefer('RETURN=minimal'))).toBe('minimal');
    expect(returnPreference(withPrefer('respond-async, return=minimal; foo="a,b"'))).toBe('minimal');
    expect(returnPreference(withPrefer('wait=10', 'return=minimal'))).toBe('minimal');
    expect(returnPreference(withPrefer('return="minimal"'))).toBe('minimal');
  });

  it('is the full representation when absent, asked for, unknown or empty', () => {
    expect(returnPreference(withPrefer())).toBe('representation');
    expect(returnPreference(withPrefer('return=representation'))).toBe('representation');
    expect(returnPreference(withPrefer('return=minimalist'))).toBe('representation');
    expect(returnPreference(withPrefer('return'))).toBe('representation');
    expect(returnPreference(withPrefer(''))).toBe('representation');
    // The first of two return preferences counts (RFC 7240 §2: a repeated preference is the first).
    expect(returnPreference(withPrefer('return=representation, return=minimal'))).toBe('representation');
  });

  it('says which preference was applied, and that the answer varies by it', () => {
    expect(preferenceHeaders('minimal')).toEqual({ 'preference-applied': 'return=minimal', vary: 'Prefer' });
    expect(preferenceHeaders('representation')).toEqual({ vary: 'Prefer' });
  });
});
