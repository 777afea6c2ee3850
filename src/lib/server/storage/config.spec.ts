import { describe, expect, it } from 'vitest';
import { EnvError } from '$lib/server/env';
import { s3Settings } from './config';

const env = (vars: Record<string, string>) => vars;

describe('photo storage settings', () => {
	it('keeps photos in the local folder when no S3_ setting is present', () => {
		expect(s3Settings(env({ DATA_DIR: './data' }))).toBeNull();
		expect(s3Settings(env({ S3_BUCKET: '  ', S3_REGION: '' }))).toBeNull();
	});

	it('reads a full S3-compatible setting; a custom endpoint implies path-style names', () => {
		expect(
			s3Settings(
				env({
					S3_BUCKET: 'shop-photos',
					S3_ENDPOINT: 'https://objects.example.test',
					S3_REGION: 'eu-central-1',
					S3_ACCESS_KEY_ID: 'AKEXAMPLE',
					S3_SECRET_ACCESS_KEY: 'secret/with+chars'
				})
			)
		).toEqual({
			bucket: 'shop-photos',
			endpoint: 'https://objects.example.test',
			region: 'eu-central-1',
			credentials: { accessKeyId: 'AKEXAMPLE', secretAccessKey: 'secret/with+chars' },
			forcePathStyle: true,
			fake: false
		});
	});

	it('defaults the region, uses the SDK credential chain without keys, and honours S3_FORCE_PATH_STYLE', () => {
		expect(s3Settings(env({ S3_BUCKET: 'shop-photos' }))).toEqual({
			bucket: 'shop-photos',
			endpoint: undefined,
			region: 'us-east-1',
			credentials: undefined,
			forcePathStyle: false,
			fake: false
		});
		const vhost = s3Settings(
			env({
				S3_BUCKET: 'shop-photos',
				S3_ENDPOINT: 'https://objects.example.test',
				S3_FORCE_PATH_STYLE: 'false'
			})
		);
		expect(vhost?.forcePathStyle).toBe(false);
		expect(s3Settings(env({ S3_BUCKET: 'shop-photos', S3_FORCE_PATH_STYLE: '1' }))?.forcePathStyle).toBe(
			true
		);
	});

	it.each([
		[{ S3_ENDPOINT: 'http://127.0.0.1:9000' }, /S3_ENDPOINT: set but S3_BUCKET is not/],
		[{ S3_BUCKET: 'Shop_Photos' }, /S3_BUCKET: expected a bucket name/],
		[{ S3_BUCKET: 'shop-photos', S3_ENDPOINT: 'objects.example.test' }, /S3_ENDPOINT: expected an http/],
		[
			{ S3_BUCKET: 'shop-photos', S3_ENDPOINT: 'ftp://objects.example.test' },
			/S3_ENDPOINT: expected an http/
		],
		[
			{ S3_BUCKET: 'shop-photos', S3_ACCESS_KEY_ID: 'AKEXAMPLE' },
			/S3_SECRET_ACCESS_KEY: set both S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY/
		],
		[
			{ S3_BUCKET: 'shop-photos', S3_FORCE_PATH_STYLE: 'maybe' },
			/S3_FORCE_PATH_STYLE: expected true or false/
		]
	])('refuses %o with a sentence naming the setting (start-up stops on it)', (vars, message) => {
		expect(() => s3Settings(env(vars))).toThrow(EnvError);
		expect(() => s3Settings(env(vars))).toThrow(message);
	});

	it('never puts the secret in its refusal', () => {
		try {
			s3Settings(env({ S3_BUCKET: 'x', S3_SECRET_ACCESS_KEY: 'very-secret-value' }));
			expect.unreachable();
		} catch (e) {
			expect(String(e)).not.toContain('very-secret-value');
		}
	});
});
