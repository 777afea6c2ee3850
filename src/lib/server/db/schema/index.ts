// Every table of the app, one file per domain. drizzle-kit reads this file to generate migrations.
export * from './users';
export * from './settings';
export * from './flows';
export * from './mail';
export * from './payments';
export * from './jobs';
export * from './runs';
export * from './attachments';
export * from './insights';
export * from './quotes';
export * from './checklists';
export * from './symptoms';
export * from './ratelimits';
export * from './backups';
