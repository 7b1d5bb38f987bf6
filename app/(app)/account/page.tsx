import type { Metadata } from 'next';
import { requirePageUser } from '@/lib/auth/session';
import { ROLE_LABELS } from '@/lib/vocabulary/roles';
import { Panel } from '@/components/ui/panel';
import { ChangePasswordForm } from './change-password-client';
import { can } from '@/lib/auth/permissions';
import { AccessTokens } from './tokens/tokens-client';

export const metadata: Metadata = { title: 'Account' };

export default async function AccountPage() {
  const user = await requirePageUser('account.read');
  return (
    <div className="grid max-w-3xl gap-6">
      <h1 className="text-xl font-semibold">Account</h1>
      <Panel title="You">
        <dl className="grid grid-cols-[8rem_1fr] gap-y-1 text-sm">
          <dt className="text-ink-muted">Name</dt>
          <dd>{user.name}</dd>
          <dt className="text-ink-muted">E-mail</dt>
          <dd>{user.email}</dd>
          <dt className="text-ink-muted">Role</dt>
          <dd data-testid="account-role">{ROLE_LABELS[user.role]}</dd>
        </dl>
      </Panel>
      <Panel title="Change password">
        <ChangePasswordForm />
      </Panel>
      {can(user.role, 'tokens.manage') ? (
        <Panel title="Access tokens for pipelines">
          <AccessTokens />
        </Panel>
      ) : null}
    </div>
  );
}
