// Corridors of the network model: list for everyone signed in; create, edit and delete for admins and
// engineers (permission 'editNetwork', enforced by the server).
import type { CorridorCreateBody, CorridorUpdateBody } from '@/shared/api/network';
import { makeResourceHooks, resourceKeys } from './network-resource';

export const corridorKeys = resourceKeys('corridors');

const hooks = makeResourceHooks<'corridors', CorridorCreateBody, CorridorUpdateBody>('corridors', corridorKeys);

export const useCorridorsQuery = hooks.useListQuery;
export const useCreateCorridorMutation = hooks.useCreateMutation;
export const useUpdateCorridorMutation = hooks.useUpdateMutation;
export const useDeleteCorridorMutation = hooks.useDeleteMutation;
