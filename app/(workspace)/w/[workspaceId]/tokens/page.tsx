import type { Metadata } from "next";
import { CreateTokenForm } from "@/components/tokens/create-token-form";
import { TokenTable } from "@/components/tokens/token-table";
import { listApiTokens, listOthersApiTokens } from "@/db/queries/api-tokens";
import { API_TOKEN_PREFIX } from "@/lib/auth/api-token-secret";
import { guardPage } from "@/lib/auth/page-guard";
import { roleAllows } from "@/lib/auth/roles";
import { createApiToken, revokeApiTokenAction } from "./actions";

export const metadata: Metadata = { title: "API tokens" };

export default async function TokensPage({ params }: { params: Promise<{ workspaceId: string }> }) {
  const { workspaceId } = await params;
  const { user, workspace } = await guardPage(
    workspaceId,
    "manageApiTokens",
    `/w/${workspaceId}/tokens`,
  );
  const oversees = roleAllows(workspace.role, "revokeAnyApiToken");
  const [tokens, othersTokens] = await Promise.all([
    listApiTokens(workspace.id, user.id),
    oversees ? listOthersApiTokens(workspace.id, user.id) : [],
  ]);
  return (
    <div className="grid gap-8 lg:grid-cols-[1.6fr_1fr]">
      <div className="space-y-8">
        <section className="space-y-4">
          <h1 className="text-2xl font-semibold">API tokens</h1>
          <p className="max-w-prose text-sm text-ink-soft">
            A personal token lets a pipeline or the command line use this workspace through
            <code className="mx-1">/api/v1</code>
            with your current role. Tokens start with <code>{API_TOKEN_PREFIX}</code>, so a leaked
            one is easy to search for; revoke it here if that happens. Times are UTC.
          </p>
          {tokens.length === 0 ? (
            <p className="rounded-lg border border-dashed border-ink/20 p-6 text-sm text-ink-soft">
              You have no tokens in this workspace yet. Create one to run analyses from a pipeline.
            </p>
          ) : (
            <TokenTable
              tokens={tokens}
              label="Your tokens"
              revokeToken={revokeApiTokenAction.bind(null, workspace.id)}
            />
          )}
        </section>
        {oversees ? (
          <section className="space-y-3" aria-labelledby="others-tokens-heading">
            <h2 id="others-tokens-heading" className="text-lg font-semibold">
              Other members&apos; tokens
            </h2>
            <p className="max-w-prose text-sm text-ink-soft">
              As an owner you can revoke anyone&apos;s token here, for example one that leaked while
              its holder is away. You never see a token&apos;s text; the audit log records each
              revocation.
            </p>
            {othersTokens.length === 0 ? (
              <p className="text-sm text-ink-soft">No other member holds a token here.</p>
            ) : (
              <TokenTable
                revokeToken={revokeApiTokenAction.bind(null, workspace.id)}
                tokens={othersTokens}
                label="Other members' tokens"
              />
            )}
          </section>
        ) : null}
      </div>
      <aside>
        <CreateTokenForm createToken={createApiToken.bind(null, workspace.id)} />
      </aside>
    </div>
  );
}
