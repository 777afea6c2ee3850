import { describe, expect, it } from 'vitest';
import { basisWords } from './provenance';

describe('basisWords', () => {
	it('names the published source', () => {
		expect(basisWords({ basis: 'published', source: 'IPC/JEDEC J-STD-033' })).toBe(
			'published: IPC/JEDEC J-STD-033'
		);
		expect(basisWords({ basis: 'published' })).toBe('published: source not named');
	});
	it("sends the technician to the maker's documentation", () => {
		expect(basisWords({ basis: 'maker' })).toBe("maker's documentation: check your model's");
		expect(basisWords({ basis: 'maker', source: 'service manual, charging section' })).toBe(
			"maker's documentation (service manual, charging section)"
		);
	});
	it('says common practice once, and keeps a "from memory" note', () => {
		expect(basisWords({ basis: 'common-practice', source: 'no published source' })).toBe(
			'common practice, no published source'
		);
		expect(basisWords({ basis: 'common-practice', source: 'from memory' })).toBe(
			'common practice, no published source (from memory)'
		);
	});
});
