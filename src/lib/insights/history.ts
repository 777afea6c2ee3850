/** Where the demo's background history stands (server: $lib/server/demo/history-status). */
export type HistoryStatus =
	| { state: 'idle' }
	| { state: 'filling'; done: number; total: number; startedAt: number }
	| { state: 'done'; total: number; seconds: number }
	| { state: 'failed'; message: string };
