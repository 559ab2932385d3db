import os from 'node:os';
import { describe, expect, test } from 'vitest';
import { isSecureOrigin, readConfig } from '~/lib/config';

describe('readConfig', () => {
  test('defaults serve a local machine', () => {
    const c = readConfig({});
    expect(c.DATABASE_URL).toBe('postgres://sumpwise@127.0.0.1:54329/sumpwise');
    expect(c.PUBLIC_URL).toBe('http://127.0.0.1:4321');
    expect(c.PORT).toBe(4321);
  });

  test.each([
    [{ PORT: 'eighty' }, /PORT/],
    [{ PORT: '70000' }, /PORT/],
    [{ DATABASE_URL: 'mysql://x' }, /DATABASE_URL must be a postgres/],
    [{ PUBLIC_URL: 'not a url' }, /PUBLIC_URL/],
    [{ APP_SECRET: 'short' }, /APP_SECRET/],
    [{ TRUST_PROXY: 'yes' }, /TRUST_PROXY must be off, on, or the number of proxies/],
    [{ TRUST_PROXY: '12' }, /TRUST_PROXY/],
    [
      { DEV_MAILBOX: '1', HOST: '0.0.0.0' },
      /DEV_MAILBOX is 1, but .* only when HOST is a loopback address .* not 0\.0\.0\.0/,
    ],
    [{ DEV_MAILBOX: '1', HOST: '192.0.2.10' }, /DEV_MAILBOX/],
    [{ APP_PROCESSES: '0' }, /APP_PROCESSES/],
    [{ APP_PROCESSES: '65' }, /APP_PROCESSES/],
    [{ APP_PROCESSES: 'all' }, /APP_PROCESSES/],
    [{ DATABASE_POOL_SIZE: '0' }, /DATABASE_POOL_SIZE/],
    [{ DATABASE_POOL_SIZE: '1.5' }, /DATABASE_POOL_SIZE/],
    [{ WORKER_POOL_SIZE: '-1' }, /WORKER_POOL_SIZE/],
    [{ CHART_CACHE_MB: '-1' }, /CHART_CACHE_MB/],
    [{ CHART_CACHE_MB: '2048' }, /CHART_CACHE_MB/],
    [{ CHART_CACHE_MB: 'lots' }, /CHART_CACHE_MB/],
    [{ PHOTO_STORE: 'ftp' }, /PHOTO_STORE/],
    [{ S3_ENDPOINT: 'ftp://127.0.0.1:21' }, /S3_ENDPOINT/],
    [{ S3_BUCKET: 'Photos_Bucket' }, /S3_BUCKET must be an S3 bucket name/],
    [{ S3_BUCKET: 'ab' }, /S3_BUCKET/],
  ])('rejects %o with one line naming the variable', (env, message) => {
    expect(() => readConfig(env)).toThrow(message);
  });

  test.each([
    [{}, 0],
    [{ TRUST_PROXY: 'off' }, 0],
    [{ TRUST_PROXY: 'on' }, 1],
    [{ TRUST_PROXY: '2' }, 2],
  ])('TRUST_PROXY %o trusts %d proxies', (env, n) => {
    expect(readConfig(env).TRUST_PROXY).toBe(n);
  });

  test.each(['127.0.0.1', '127.1.2.3', '::1', 'localhost'])('the dev mailbox may be served on loopback %s', (HOST) => {
    expect(readConfig({ DEV_MAILBOX: '1', HOST }).DEV_MAILBOX).toBe(true);
  });

  test('one app process per core with small pools, and photos in the S3 store (the local fake), by default', () => {
    const c = readConfig({});
    expect(c.APP_PROCESSES).toBe(Math.min(64, os.availableParallelism()));
    expect([c.DATABASE_POOL_SIZE, c.WORKER_POOL_SIZE]).toEqual([8, 5]);
    expect(c.CHART_CACHE_MB).toBe(16);
    expect(c.PHOTO_STORE).toBe('s3');
    expect(c.S3_ENDPOINT).toBe('http://127.0.0.1:4568');
    expect(c.S3_FORCE_PATH_STYLE).toBe(true);
  });

  test.each([
    [
      { APP_PROCESSES: '3', DATABASE_POOL_SIZE: '12' },
      { APP_PROCESSES: 3, DATABASE_POOL_SIZE: 12 },
    ],
    [{ CHART_CACHE_MB: '0' }, { CHART_CACHE_MB: 0 }],
    [
      { PHOTO_STORE: 'disk', UPLOAD_DIR: '/srv/photos' },
      { PHOTO_STORE: 'disk', UPLOAD_DIR: '/srv/photos' },
    ],
    [
      { S3_FORCE_PATH_STYLE: '0', S3_BUCKET: 'crew.photos-01' },
      { S3_FORCE_PATH_STYLE: false, S3_BUCKET: 'crew.photos-01' },
    ],
  ])('reads %o', (env, expected) => {
    expect(readConfig(env)).toMatchObject(expected);
  });

  test('empty strings count as unset', () => {
    expect(readConfig({ PORT: '' }).PORT).toBe(4321);
  });

  test.each([
    ['https://sumpwise.example', true],
    ['http://127.0.0.1:4321', false],
  ])('cookies are Secure for %s: %s', (url, secure) => {
    expect(isSecureOrigin(readConfig({ PUBLIC_URL: url }))).toBe(secure);
  });
});
