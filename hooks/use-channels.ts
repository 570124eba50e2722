// Channels of the network model: list for everyone signed in; create, edit and delete for admins and
// engineers (permission 'editNetwork', enforced by the server).
import type { ChannelCreateBody, ChannelUpdateBody } from '@/shared/api/network';
import { makeResourceHooks, resourceKeys } from './network-resource';

export const channelKeys = resourceKeys('channels');

const hooks = makeResourceHooks<'channels', ChannelCreateBody, ChannelUpdateBody>('channels', channelKeys);

export const useChannelsQuery = hooks.useListQuery;
export const useCreateChannelMutation = hooks.useCreateMutation;
export const useUpdateChannelMutation = hooks.useUpdateMutation;
export const useDeleteChannelMutation = hooks.useDeleteMutation;
