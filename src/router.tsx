import { createBrowserRouter } from 'react-router';
import { AppShell } from '@/components/layout/app-shell';
import { RouteError } from '@/routes/route-error';
import * as home from '@/routes/home';
import * as challenges from '@/routes/challenges';
import * as signUp from '@/routes/sign-up';
import * as signIn from '@/routes/sign-in';
import * as verified from '@/routes/verified';
import * as forgot from '@/routes/forgot-password';
import * as reset from '@/routes/reset-password';
import * as account from '@/routes/account';
import * as teams from '@/routes/teams';
import * as team from '@/routes/team';
import * as invitation from '@/routes/invitation';
import * as notFound from '@/routes/not-found';

export const router = createBrowserRouter([
  {
    element: <AppShell />,
    errorElement: <RouteError />,
    children: [
      {
        errorElement: <RouteError />,
        children: [
          { index: true, loader: home.loader, Component: home.Component },
          { path: 'challenges', loader: challenges.loader, Component: challenges.Component },
          // the challenge and entry pages (tables, charts) load on first visit only
          { path: 'challenges/:slug', lazy: () => import('@/routes/challenge') },
          { path: 'challenges/:slug/specification', lazy: () => import('@/routes/specification') },
          { path: 'challenges/:slug/targets/:targetKey', lazy: () => import('@/routes/target') },
          { path: 'challenges/:slug/depth', lazy: () => import('@/routes/depth') },
          { path: 'compare', lazy: () => import('@/routes/compare') },
          { path: 'entries/:entryId', lazy: () => import('@/routes/entry') },
          // submitting and the team's entries (editable table) load on first visit only
          { path: 'challenges/:slug/submit', lazy: () => import('@/routes/submit') },
          { path: 'my-entries', lazy: () => import('@/routes/my-entries') },
          // the public statement of the scoring rules, linked from every standings table
          { path: 'scoring', lazy: () => import('@/routes/scoring') },
          { path: 'api-reference', lazy: () => import('@/routes/api-reference') },
          { path: 'unfollow/:token', lazy: () => import('@/routes/unfollow') },
          { path: 'sign-up', Component: signUp.Component },
          { path: 'sign-in', Component: signIn.Component },
          { path: 'verified', Component: verified.Component },
          { path: 'forgot-password', Component: forgot.Component },
          { path: 'reset-password', Component: reset.Component },
          { path: 'account', loader: account.loader, Component: account.Component },
          { path: 'teams', loader: teams.loader, Component: teams.Component },
          { path: 'teams/:teamId', loader: team.loader, Component: team.Component },
          { path: 'invitations/:invitationId', Component: invitation.Component },
          { path: 'moderation', lazy: () => import('@/routes/moderation') },
          { path: 'moderation/challenges', lazy: () => import('@/routes/moderation-challenges') },
          { path: 'moderation/challenges/:slug', lazy: () => import('@/routes/moderation-challenge') },
          { path: 'moderation/audit', lazy: () => import('@/routes/moderation-audit') },
          // admin pages (and @tanstack/react-table) load on first visit only
          { path: 'admin', lazy: () => import('@/routes/admin') },
          { path: 'admin/outbox', lazy: () => import('@/routes/admin-outbox') },
          { path: 'admin/outbox/:messageId', lazy: () => import('@/routes/admin-outbox-message') },
          { path: '*', Component: notFound.Component },
        ],
      },
    ],
  },
]);
