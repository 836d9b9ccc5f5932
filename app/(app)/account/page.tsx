import { pageIdentity, hasRole } from "@/lib/auth/page-identity";
import { listApiTokens } from "@/lib/auth/tokens";
import { TOKEN_OWNERS } from "@/lib/actions/account";
import { PageHeader } from "@/components/ui/page-header";
import { Card } from "@/components/ui/card";
import { PasswordForm } from "@/components/account/password-form";
import { TokensPanel } from "@/components/account/tokens-panel";

export const metadata = { title: "Account" };

export default async function AccountPage() {
  const who = await pageIdentity();
  const mayOwnTokens = hasRole(who, TOKEN_OWNERS);
  const tokens = mayOwnTokens ? await listApiTokens(who.userId) : [];
  return (
    <>
      <PageHeader title="Account" purpose="Your password and the API tokens the command-line client and scripts sign in with." />
      <div className="grid gap-4 lg:grid-cols-2">
        <Card title="Change password"><PasswordForm /></Card>
        <Card title="API tokens">
          {mayOwnTokens ? (
            <TokensPanel tokens={tokens.map((t) => ({ ...t, createdAt: t.createdAt.toISOString(), expiresAt: t.expiresAt?.toISOString() ?? null, revokedAt: t.revokedAt?.toISOString() ?? null, lastUsedAt: t.lastUsedAt?.toISOString() ?? null }))} />
          ) : <p className="text-sm text-ink-soft">Viewers read through the app; API tokens are for researchers and up.</p>}
        </Card>
      </div>
    </>
  );
}
