import type { Metadata } from "next";
import { CreateTokenForm } from "@/components/tokens/create-token-form";
import { RevokeTokenButton } from "@/components/tokens/revoke-token-button";
import { listApiTokens, type ApiTokenListItem } from "@/db/queries/api-tokens";
import { API_TOKEN_PREFIX } from "@/lib/auth/api-token-secret";
import { guardPage } from "@/lib/auth/page-guard";

export const metadata: Metadata = { title: "API tokens" };

const dateFormat = new Intl.DateTimeFormat("en", { dateStyle: "medium", timeZone: "UTC" });
const dateTimeFormat = new Intl.DateTimeFormat("en", {
  dateStyle: "medium",
  timeStyle: "short",
  timeZone: "UTC",
});

function describeState(token: ApiTokenListItem, now: Date): { label: string; live: boolean } {
  if (token.revokedAt)
    return { label: `Revoked ${dateFormat.format(token.revokedAt)}`, live: false };
  if (token.expiresAt <= now)
    return { label: `Expired ${dateFormat.format(token.expiresAt)}`, live: false };
  return { label: `Expires ${dateFormat.format(token.expiresAt)}`, live: true };
}

export default async function TokensPage({ params }: { params: Promise<{ workspaceId: string }> }) {
  const { workspaceId } = await params;
  const { user } = await guardPage(workspaceId, "manageApiTokens", `/w/${workspaceId}/tokens`);
  const tokens = await listApiTokens(workspaceId, user.id);
  const now = new Date();
  return (
    <div className="grid gap-8 lg:grid-cols-[1.6fr_1fr]">
      <section className="space-y-4">
        <h1 className="text-2xl font-semibold">API tokens</h1>
        <p className="max-w-prose text-sm text-ink-soft">
          A personal token lets a pipeline or the command line use this workspace through
          <code className="mx-1">/api/v1</code>
          with your current role. Tokens start with <code>{API_TOKEN_PREFIX}</code>, so a leaked one
          is easy to search for; revoke it here if that happens. Times are UTC.
        </p>
        {tokens.length === 0 ? (
          <p className="rounded-lg border border-dashed border-ink/20 p-6 text-sm text-ink-soft">
            You have no tokens in this workspace yet. Create one to run analyses from a pipeline.
          </p>
        ) : (
          <div className="overflow-hidden rounded-lg border border-ink/10 bg-white">
            <table className="w-full text-sm" data-testid="token-table">
              <thead className="bg-paper-deep text-left text-xs tracking-wide text-ink-soft uppercase">
                <tr>
                  <th scope="col" className="px-4 py-2 font-medium">
                    Name
                  </th>
                  <th scope="col" className="px-4 py-2 font-medium">
                    Last used
                  </th>
                  <th scope="col" className="px-4 py-2 font-medium">
                    State
                  </th>
                  <th scope="col" className="px-4 py-2 text-right font-medium">
                    <span className="sr-only">Actions</span>
                  </th>
                </tr>
              </thead>
              <tbody className="divide-y divide-ink/5">
                {tokens.map((token) => {
                  const state = describeState(token, now);
                  return (
                    <tr key={token.id} className={state.live ? "" : "text-ink-faint"}>
                      <td className="px-4 py-3">
                        <span className="block font-medium">{token.name}</span>
                        <span className="block text-xs text-ink-soft">
                          Created {dateFormat.format(token.createdAt)}
                        </span>
                      </td>
                      <td className="px-4 py-3">
                        {token.lastUsedAt ? dateTimeFormat.format(token.lastUsedAt) : "Never"}
                      </td>
                      <td className="px-4 py-3">{state.label}</td>
                      <td className="px-4 py-3 text-right">
                        {state.live ? (
                          <RevokeTokenButton
                            workspaceId={workspaceId}
                            tokenId={token.id}
                            name={token.name}
                          />
                        ) : null}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        )}
      </section>
      <aside>
        <CreateTokenForm workspaceId={workspaceId} />
      </aside>
    </div>
  );
}
