// Areas of the network model: list for everyone signed in; create, edit and delete for admins and
// engineers (permission 'editNetwork', enforced by the server).
import type { AreaCreateBody, AreaUpdateBody } from '@/shared/api/network';
import { makeResourceHooks, resourceKeys } from './network-resource';

export const areaKeys = resourceKeys('areas');

const hooks = makeResourceHooks<'areas', AreaCreateBody, AreaUpdateBody>('areas', areaKeys);

export const useAreasQuery = hooks.useListQuery;
export const useCreateAreaMutation = hooks.useCreateMutation;
export const useUpdateAreaMutation = hooks.useUpdateMutation;
export const useDeleteAreaMutation = hooks.useDeleteMutation;
