/** The HTTP contract, one file per area; import from `@/lib/schemas`. */
export * from './core';
export * from './digests';
export * from './mail';
export * from './exports';
export * from './photos';
export * from './record';
export * from './samples';
export * from './team';
export * from './telemetry';
export * from './search';
export * from './taxa';
export * from './measurements';
export * from './watches';
export * from './reports';
