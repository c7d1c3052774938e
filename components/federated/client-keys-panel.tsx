"use client";

import { useState, useTransition, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { SelectField } from "@/components/ui/select-field";
import type { ActionResult } from "@/lib/actions/result";
import type { IssueClientKeyInput, IssuedClientKey } from "@/lib/validation/federated-analysis";
import { CopyButton } from "./copy-button";

const dateTimeFormat = new Intl.DateTimeFormat("en", {
  dateStyle: "medium",
  timeStyle: "short",
  timeZone: "UTC",
});

/** The command a client runs with its key where its data live (FILE and COL are its own). */
export function clientCommand(origin: string, key: string, labelColumn: string): string {
  const label = /^[\w.-]+$/.test(labelColumn)
    ? labelColumn
    : `'${labelColumn.replace(/'/g, `'\\''`)}'`;
  return `npm run digest -- --server ${origin} --key ${key} --data FILE --label ${label} --shard-column COL`;
}

/**
 * Issues a key for one client of the roster and shows it once, with the exact command that client
 * runs; Partita keeps only the key's hash.
 */
export function IssueKeyForm({
  clients,
  lifetimes,
  labelColumn,
  issueKey,
}: {
  clients: string[];
  lifetimes: readonly number[];
  labelColumn: string;
  /** The route's action, bound to this analysis. */
  issueKey: (input: IssueClientKeyInput) => Promise<ActionResult<IssuedClientKey>>;
}) {
  const [client, setClient] = useState(clients[0] ?? "");
  const [lifetimeDays, setLifetimeDays] = useState(7);
  const [error, setError] = useState<string>();
  const [issued, setIssued] = useState<{ key: string; client: string; expiresAt: Date }>();
  const [pending, startTransition] = useTransition();

  function submit(event: FormEvent) {
    event.preventDefault();
    startTransition(async () => {
      const result = await issueKey({
        client,
        lifetimeDays,
      });
      if (result.ok) {
        setIssued(result.data);
        setError(undefined);
      } else {
        setError(result.message);
      }
    });
  }

  const command = issued ? clientCommand(window.location.origin, issued.key, labelColumn) : "";
  return (
    <div className="space-y-4">
      {issued ? (
        <div
          className="space-y-3 rounded-lg border border-verdigris/40 bg-verdigris-soft p-4"
          data-testid="issued-key"
        >
          <p className="text-sm font-medium">
            Key for “{issued.client}”, valid until{" "}
            {dateTimeFormat.format(new Date(issued.expiresAt))} UTC — copy it now; Partita keeps
            only a fingerprint of it and cannot show it again.
          </p>
          <code className="block overflow-x-auto rounded bg-white px-3 py-2 font-mono text-sm break-all select-all">
            {issued.key}
          </code>
          <p className="text-sm">
            “{issued.client}” runs, where its data live (FILE is its data file, COL its shard
            column; <code className="font-mono">--partition FILE</code> or{" "}
            <code className="font-mono">--shard NAME</code> instead of{" "}
            <code className="font-mono">--shard-column</code> also work):
          </p>
          <code
            className="block overflow-x-auto rounded bg-white px-3 py-2 font-mono text-sm break-all select-all"
            data-testid="client-command"
          >
            {command}
          </code>
          <div className="flex flex-wrap gap-2">
            <CopyButton text={issued.key} label="Copy key" />
            <CopyButton text={command} label="Copy command" />
          </div>
        </div>
      ) : null}
      <form
        onSubmit={submit}
        noValidate
        className="flex flex-wrap items-end gap-3"
        aria-label="Issue a client key"
      >
        <div className="min-w-48">
          <SelectField
            id="key-client"
            name="client"
            label="Client"
            value={client}
            onChange={(event) => setClient(event.target.value)}
          >
            {clients.map((name) => (
              <option key={name} value={name}>
                {name}
              </option>
            ))}
          </SelectField>
        </div>
        <div>
          <SelectField
            id="key-lifetime"
            name="lifetimeDays"
            label="Expires after"
            value={lifetimeDays}
            onChange={(event) => setLifetimeDays(Number(event.target.value))}
          >
            {lifetimes.map((days) => (
              <option key={days} value={days}>
                {days} day{days === 1 ? "" : "s"}
              </option>
            ))}
          </SelectField>
        </div>
        <Button type="submit" disabled={pending || !client}>
          {pending ? "Issuing…" : "Issue a key"}
        </Button>
      </form>
      {error ? <Notice tone="error">{error}</Notice> : null}
    </div>
  );
}
