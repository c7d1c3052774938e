import type { ApiTokenListItem } from "@/db/queries/api-tokens";
import { ConfirmActionButton } from "@/components/ui/confirm-action-button";
import type { ActionResult } from "@/lib/actions/result";
import { describeSecretState } from "./secret-state";

const dateFormat = new Intl.DateTimeFormat("en", { dateStyle: "medium", timeZone: "UTC" });
const dateTimeFormat = new Intl.DateTimeFormat("en", {
  dateStyle: "medium",
  timeStyle: "short",
  timeZone: "UTC",
});

/**
 * Tokens with their last use and state, and Revoke on the live ones. With `holderEmail` on the
 * rows (an owner's view of other members' tokens) a column says whose each one is.
 */
export function TokenTable({
  tokens,
  label,
  revokeToken,
}: {
  /** The route's revoke action, bound to the workspace. */
  revokeToken: (tokenId: string) => Promise<ActionResult>;
  tokens: (ApiTokenListItem & { holderEmail?: string })[];
  label: string;
}) {
  const now = new Date();
  const showHolder = tokens.some((token) => token.holderEmail !== undefined);
  const headers = ["Name", ...(showHolder ? ["Holder"] : []), "Last used", "State"];
  return (
    <div className="overflow-hidden rounded-lg border border-ink/10 bg-white">
      <table className="w-full text-sm" aria-label={label}>
        <thead className="bg-paper-deep text-left text-xs tracking-wide text-ink-soft uppercase">
          <tr>
            {headers.map((header) => (
              <th key={header} scope="col" className="px-4 py-2 font-medium">
                {header}
              </th>
            ))}
            <th scope="col" className="px-4 py-2 text-right font-medium">
              <span className="sr-only">Actions</span>
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-ink/5">
          {tokens.map((token) => {
            const state = describeSecretState(token, now, dateFormat);
            return (
              <tr key={token.id} className={state.live ? "" : "text-ink-faint"}>
                <td className="px-4 py-3">
                  <span className="block font-medium">{token.name}</span>
                  <span className="block text-xs text-ink-soft">
                    Created {dateFormat.format(token.createdAt)}
                  </span>
                </td>
                {showHolder ? <td className="px-4 py-3">{token.holderEmail}</td> : null}
                <td className="px-4 py-3">
                  {token.lastUsedAt ? dateTimeFormat.format(token.lastUsedAt) : "Never"}
                </td>
                <td className="px-4 py-3">{state.label}</td>
                <td className="px-4 py-3 text-right">
                  {state.live ? (
                    <ConfirmActionButton
                      label="Revoke"
                      confirmation={`Revoke “${token.name}”? Pipelines using it stop working at once.`}
                      action={revokeToken.bind(null, token.id)}
                    />
                  ) : null}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
