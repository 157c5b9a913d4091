/**
 * The campaign team and the site's administration: members, invitations, campaign set-up, the
 * site administrator's campaigns, accounts and caught mail, and a person's own password.
 */
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';

import {
  campaignSchema,
  invitationSchema,
  mailLogSchema,
  mailStatusSchema,
  memberSchema,
  type CampaignCreate,
  type CampaignRole,
  type CampaignUpdate,
  type InvitationCreate,
  type Member,
} from '@/lib/schemas';
import { request } from './api';
import { campaignKeys, campaignMembersQuery } from './campaigns';
import { meQuery, sessionKeys } from './session';

const path = (id: string) => `/api/campaigns/${encodeURIComponent(id)}`;

export const teamKeys = {
  invitations: (campaignId: string) => [...campaignKeys.detail(campaignId), 'invitations'] as const,
};

export const adminKeys = {
  root: ['admin'] as const,
  users: () => [...adminKeys.root, 'users'] as const,
  mailLog: () => [...adminKeys.root, 'mail-log'] as const,
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

/**
 * Only a lead may read the invitations, so the query waits until the caller is known to be one.
 * While a mail is still on its way the list is asked again every few seconds, to show it sent or failed.
 */
export const useInvitations = (campaignId: string | undefined, isLead: boolean) =>
  useQuery({
    ...invitationsQuery(campaignId ?? ''),
    enabled: !!campaignId && isLead,
    refetchInterval: (q) => (q.state.data?.some((i) => i.mail?.state === 'queued' || i.mail?.state === 'sending') ? 4000 : false),
  });

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

const createdCampaignSchema = campaignSchema.extend({ leadInvited: z.boolean(), leadInvitation: invitationSchema.nullable() });
export type CreatedCampaign = z.infer<typeof createdCampaignSchema>;

export function useCreateCampaign() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CampaignCreate): Promise<CreatedCampaign> => request('/api/campaigns', createdCampaignSchema, { body: input }),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: campaignKeys.list() });
      void qc.invalidateQueries({ queryKey: adminKeys.mailLog() });
    },
  });
}

/* ---- the mail log ---- */

/** The queue's mail (queued, sent, failed with the reason) and what the built-in catcher caught (null when mail goes out through SMTP). */
export const mailLogQuery = queryOptions({
  queryKey: adminKeys.mailLog(),
  queryFn: () => request('/api/admin/mail?limit=200', mailLogSchema),
  staleTime: 0,
});

export const useMailLog = () => useQuery(mailLogQuery);

/** Puts a failed mail back in the queue (a new campaign's lead cannot resend their own invitation). */
export function useRetryMail() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (mailId: string) => request(`/api/admin/mail/${encodeURIComponent(mailId)}/retry`, mailStatusSchema, { body: {} }),
    onSuccess: () => qc.invalidateQueries({ queryKey: adminKeys.mailLog() }),
  });
}

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
