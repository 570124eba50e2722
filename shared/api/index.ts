// One import for the web client: `import { ENDPOINTS, personSchema, … } from '@/shared/api'`.
export * from './common';
export * from './auth';
export * from './invitations';
export * from './password-reset';
export * from './outbox';
export * from './network';
export * from './health';
export { peopleListResponseSchema, personResponseSchema, personUpdateBodySchema } from './people';
export type { PeopleListResponse, PersonResponse, PersonUpdateBody } from './people';
export * from './endpoints';
