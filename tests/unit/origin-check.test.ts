import { describe, expect, test } from 'vitest';
import { isForbiddenCrossSiteWrite, type OriginPolicy } from '~/lib/http/origin-check';

const policy: OriginPolicy = {
  allowedOrigins: ['http://127.0.0.1:4321', 'https://sumpwise.example'],
  exemptPaths: ['/api/unsubscribe'],
};
const form = 'application/x-www-form-urlencoded';

describe('isForbiddenCrossSiteWrite', () => {
  test.each([
    // method, path, origin, content type, forbidden?
    ['GET', '/machines', 'https://evil.example', null, false],
    ['POST', '/sign-in', 'http://127.0.0.1:4321', form, false],
    ['POST', '/sign-in', 'https://sumpwise.example', form, false],
    ['POST', '/sign-in', 'https://evil.example', form, true],
    ['POST', '/sign-in', null, form, true],
    ['POST', '/api/photos', null, 'multipart/form-data; boundary=x', true],
    ['POST', '/api/crews', null, 'text/plain;charset=UTF-8', true],
    ['POST', '/sign-out', null, null, false], // no body, no Origin: not a browser
    ['POST', '/sign-out', 'https://evil.example', null, true],
    ['POST', '/api/crews', 'https://evil.example', 'application/json', true],
    ['POST', '/api/crews', null, 'application/json', false],
    ['DELETE', '/api/crews/x/members/y', 'https://evil.example', null, true],
    ['POST', '/api/unsubscribe', null, form, false],
    ['POST', '/api/unsubscribe', 'https://mail-provider.example', form, false],
    ['POST', '/api/unsubscribe/other', 'https://evil.example', form, true],
  ])('%s %s from %s (%s) → forbidden %s', (method, path, origin, type, forbidden) => {
    const headers = new Headers();
    if (origin) headers.set('origin', origin);
    if (type) headers.set('content-type', type);
    expect(isForbiddenCrossSiteWrite(method, path, headers, policy)).toBe(forbidden);
  });
});
