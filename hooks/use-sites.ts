// Sites of the network model: list for everyone signed in; create, edit and delete for admins and
// engineers (permission 'editNetwork', enforced by the server).
import type { SiteCreateBody, SiteUpdateBody } from '@/shared/api/network';
import { makeResourceHooks, resourceKeys } from './network-resource';

export const siteKeys = resourceKeys('sites');

const hooks = makeResourceHooks<'sites', SiteCreateBody, SiteUpdateBody>('sites', siteKeys);

export const useSitesQuery = hooks.useListQuery;
export const useCreateSiteMutation = hooks.useCreateMutation;
export const useUpdateSiteMutation = hooks.useUpdateMutation;
export const useDeleteSiteMutation = hooks.useDeleteMutation;
