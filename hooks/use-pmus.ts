// PMUs of the network model: list for everyone signed in; create, edit and delete for admins and
// engineers (permission 'editNetwork', enforced by the server).
import type { PmuCreateBody, PmuUpdateBody } from '@/shared/api/network';
import { makeResourceHooks, resourceKeys } from './network-resource';

export const pmuKeys = resourceKeys('pmus');

const hooks = makeResourceHooks<'pmus', PmuCreateBody, PmuUpdateBody>('pmus', pmuKeys);

export const usePmusQuery = hooks.useListQuery;
export const useCreatePmuMutation = hooks.useCreateMutation;
export const useUpdatePmuMutation = hooks.useUpdateMutation;
export const useDeletePmuMutation = hooks.useDeleteMutation;
