/** Request/response schemas and types of the HTTP API, one module per resource. */
export * from './roles';
export * from './errors';
export * from './common';
export * from './health';
export * from './auth';
export * from './users';
export * from './rigs';
export * from './audit';
export * from './outbox';
export * from './studies';
export * from './participants';
export * from './sessions';
export * from './live';
