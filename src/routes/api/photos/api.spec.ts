import { expect, it } from 'vitest';
import { getStore, MemoryStore } from '$lib/server/storage';
import { photoApiSuite } from './photo-suite';

// The photo routes against the in-memory blob store (DATA_DIR=memory://, no S3 settings).
it('uses the in-memory store', () => {
	expect(getStore()).toBeInstanceOf(MemoryStore);
});

photoApiSuite();
