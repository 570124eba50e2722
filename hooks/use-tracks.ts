// Mode tracks of the network model: list for everyone signed in; create, edit and delete for admins and
// engineers (permission 'editNetwork', enforced by the server).
import type { TrackCreateBody, TrackUpdateBody } from '@/shared/api/network';
import { makeResourceHooks, resourceKeys } from './network-resource';

export const trackKeys = resourceKeys('tracks');

const hooks = makeResourceHooks<'tracks', TrackCreateBody, TrackUpdateBody>('tracks', trackKeys);

export const useTracksQuery = hooks.useListQuery;
export const useCreateTrackMutation = hooks.useCreateMutation;
export const useUpdateTrackMutation = hooks.useUpdateMutation;
export const useDeleteTrackMutation = hooks.useDeleteMutation;
