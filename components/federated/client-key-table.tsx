import { describeSecretState } from "@/components/tokens/secret-state";
import { ConfirmActionButton } from "@/components/ui/confirm-action-button";
import type { ActionResult } from "@/lib/actions/result";
import type { FederatedStatus } from "@/lib/federated";

const dateTimeFormat = new Intl.DateTimeFormat("en", {
  dateStyle: "medium",
  timeStyle: "short",
  timeZone: "UTC",
});

type ClientKey = FederatedStatus["keys"][number];

/** The analysis's client keys (never the keys themselves): whose, when used, expiry, Revoke. */
export function ClientKeyTable({
  keys,
  revokeKey,
}: {
  keys: ClientKey[];
  /** The route's action, bound to this analysis; absent for roles that cannot revoke. */
  revokeKey?: (keyId: string) => Promise<ActionResult>;
}) {
  if (keys.length === 0) {
    return <p className="text-sm text-ink-soft">No keys issued yet.</p>;
  }
  const now = new Date();
  return (
    <div className="overflow-x-auto rounded-lg border border-ink/10 bg-white">
      <table className="w-full text-sm" aria-label="Client keys">
        <thead className="bg-paper-deep text-left text-xs tracking-wide text-ink-soft uppercase">
          <tr>
            {["Client", "Issued (UTC)", "Last used", "State"].map((header) => (
              <th key={header} scope="col" className="px-3 py-2 font-medium">
                {header}
              </th>
            ))}
            <th scope="col" className="px-3 py-2">
              <span className="sr-only">Actions</span>
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-ink/5">
          {keys.map((key) => {
            const state = describeSecretState(key, now, dateTimeFormat);
            return (
              <tr key={key.id} className={state.live ? "" : "text-ink-faint"}>
                <td className="px-3 py-2 font-medium">{key.client}</td>
                <td className="px-3 py-2 tabular-nums">{dateTimeFormat.format(key.createdAt)}</td>
                <td className="px-3 py-2 tabular-nums">
                  {key.lastUsedAt ? dateTimeFormat.format(key.lastUsedAt) : "Never"}
                </td>
                <td className="px-3 py-2">{state.label}</td>
                <td className="px-3 py-2 text-right">
                  {state.live && revokeKey ? (
                    <ConfirmActionButton
                      label="Revoke"
                      confirmation={`Revoke this key of “${key.client}”? A client using it can send nothing more with it.`}
                      action={revokeKey.bind(null, key.id)}
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
