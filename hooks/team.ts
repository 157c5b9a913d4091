/**
 * The campaign team and the site's administration: members, invitations, campaign set-up, the
 * site administrator's campaigns, accounts and caught mail, and a person's own password.
 */
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';

import {
  campaignSchema,
  caughtMailSchema,
  invitationSchema,
  memberSchema,
  type Campaign,
  type CampaignCreate,
  type CampaignRole,
  type CampaignUpdate,
  type InvitationCreate,
  type Member,
} from '@/lib/schemas';
import { ApiError, request } from './api';
import { campaignKeys, campaignMembersQuery } from './campaigns';
import { meQuery, sessionKeys } from './session';

const path = (id: string) => `/api/campaigns/${encodeURIComponent(id)}`;

export const teamKeys = {
  invitations: (campaignId: string) => [...campaignKeys.detail(campaignId), 'invitations'] as const,
};

export const adminKeys = {
  root: ['admin'] as const,
  users: () => [...adminKeys.root, 'users'] as const,
  outbox: () => [...adminKeys.root, 'outbox'] as const,
};

/* ---- members ---- */

export const useCampaignMembers = (campaignId: string | undefined) =>
  useQuery({ ...campaignMembersQuery(campaignId ?? ''), enabled: !!campaignId });

/**
 * A role change or a removal answers with the whole team; a change to one's own membership
 * also changes what the campaign lets this person do, so their campaign and session are asked again.
 */
function useMembersAnswer(campaignId: string) {
  const qc = useQueryClient();
  return (members: Member[], userId: string) => {
    qc.setQueryData(campaignMembersQuery(campaignId).queryKey, members);
    const me = qc.getQueryData(meQuery.queryKey);
    if (me?.user.id === userId) {
      void qc.invalidateQueries({ queryKey: campaignKeys.detail(campaignId) });
      void qc.invalidateQueries({ queryKey: campaignKeys.list() });
      void qc.invalidateQueries({ queryKey: sessionKeys.me() });
    }
  };
}

export function useChangeRole(campaignId: string) {
  const answered = useMembersAnswer(campaignId);
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: CampaignRole }) =>
      request(`${path(campaignId)}/members/${encodeURIComponent(userId)}`, z.array(memberSchema), { method: 'PATCH', body: { role } }),
    onSuccess: (members, { userId }) => answered(members, userId),
  });
}

export function useRemoveMember(campaignId: string) {
  const answered = useMembersAnswer(campaignId);
  return useMutation({
    mutationFn: (userId: string) =>
      request(`${path(campaignId)}/members/${encodeURIComponent(userId)}`, z.array(memberSchema), { method: 'DELETE' }),
    onSuccess: (members, userId) => answered(members, userId),
  });
}

/* ---- invitations ---- */

export const invitationsQuery = (campaignId: string) =>
  queryOptions({
    queryKey: teamKeys.invitations(campaignId),
    queryFn: () => request(`${path(campaignId)}/invitations`, z.array(invitationSchema)),
  });

/** Only a lead may read the invitations, so the query waits until the caller is known to be one. */
export const useInvitations = (campaignId: string | undefined, isLead: boolean) =>
  useQuery({ ...invitationsQuery(campaignId ?? ''), enabled: !!campaignId && isLead });

export function useInvite(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: InvitationCreate) => request(`${path(campaignId)}/invitations`, invitationSchema, { body: input }),
    onSuccess: () => qc.invalidateQueries({ queryKey: teamKeys.invitations(campaignId) }),
  });
}

export function useResendInvitation(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (invitationId: string) =>
      request(`/api/invitations/${encodeURIComponent(invitationId)}/resend`, invitationSchema, { body: {} }),
    onSuccess: () => qc.invalidateQueries({ queryKey: teamKeys.invitations(campaignId) }),
  });
}

export function useRevokeInvitation(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (invitationId: string) =>
      request(`/api/invitations/${encodeURIComponent(invitationId)}`, invitationSchema, { method: 'DELETE' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: teamKeys.invitations(campaignId) }),
  });
}

/* ---- campaigns ---- */

export function useUpdateCampaign(campaignId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CampaignUpdate) => request(path(campaignId), campaignSchema, { method: 'PATCH', body: input }),
    onSuccess: (campaign) => {
      qc.setQueryData(campaignKeys.detail(campaignId), campaign);
      void qc.invalidateQueries({ queryKey: campaignKeys.list() });
    },
  });
}

const createdCampaignSchema = campaignSchema.extend({ leadInvited: z.boolean() });
export type CreatedCampaign = Campaign & { leadInvited: boolean };

export function useCreateCampaign() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CampaignCreate): Promise<CreatedCampaign> => request('/api/campaigns', createdCampaignSchema, { body: input }),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: campaignKeys.list() });
      void qc.invalidateQueries({ queryKey: adminKeys.outbox() });
    },
  });
}

/* ---- caught mail ---- */

/** The mail the built-in catcher holds, newest first; null when mail really goes out by SMTP. */
export const mailOutboxQuery = queryOptions({
  queryKey: adminKeys.outbox(),
  queryFn: async () => {
    try {
      return await request('/api/dev/outbox?limit=200', z.array(caughtMailSchema));
    } catch (err) {
      if (err instanceof ApiError && err.status === 404) return null;
      throw err;
    }
  },
  staleTime: 0,
});

export const useMailOutbox = () => useQuery(mailOutboxQuery);

/* ---- accounts (better-auth's admin endpoints) ---- */

const adminUserSchema = z
  .object({
    id: z.string(),
    name: z.string(),
    email: z.string(),
    role: z.string().nullish(),
    banned: z.boolean().nullish(),
    banReason: z.string().nullish(),
    createdAt: z.string(),
  })
  .loose();
export type SiteUser = z.infer<typeof adminUserSchema>;

const adminUserListSchema = z.object({ users: z.array(adminUserSchema), total: z.number() }).loose();

export const siteUsersQuery = queryOptions({
  queryKey: adminKeys.users(),
  queryFn: () => request('/api/auth/admin/list-users?limit=100&sortBy=name&sortDirection=asc', adminUserListSchema),
});

export const useSiteUsers = (enabled: boolean) => useQuery({ ...siteUsersQuery, enabled });

const userAnswer = z.object({ user: adminUserSchema }).loose();

export function useBanUser() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { userId: string; banReason?: string }) => request('/api/auth/admin/ban-user', userAnswer, { body: input }),
    onSuccess: () => qc.invalidateQueries({ queryKey: adminKeys.users() }),
  });
}

export function useUnbanUser() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) => request('/api/auth/admin/unban-user', userAnswer, { body: { userId } }),
    onSuccess: () => qc.invalidateQueries({ queryKey: adminKeys.users() }),
  });
}

/* ---- one's own sessions ---- */

export function useChangePassword() {
  return useMutation({
    mutationFn: (input: { currentPassword: string; newPassword: string; revokeOtherSessions: boolean }) =>
      request('/api/auth/change-password', z.object({}).loose(), { body: input }),
  });
}

export function useRevokeOtherSessions() {
  return useMutation({
    mutationFn: () => request('/api/auth/revoke-other-sessions', z.object({}).loose(), { body: {} }),
  });
}
