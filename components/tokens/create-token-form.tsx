"use client";

import { useState, useTransition, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import type { ActionResult } from "@/lib/actions/result";
import { TOKEN_LIFETIME_DAYS, type CreateApiTokenInput } from "@/lib/auth/api-token-schema";

/** Names a new token, picks its lifetime, and shows the token once after it is made. */
export function CreateTokenForm({
  createToken,
}: {
  /** The route's action, bound to the workspace. */
  createToken: (
    input: CreateApiTokenInput,
  ) => Promise<ActionResult<{ token: string; name: string; expiresAt: Date }>>;
}) {
  const [name, setName] = useState("");
  const [lifetimeDays, setLifetimeDays] = useState<number>(90);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string>();
  const [created, setCreated] = useState<{ token: string; name: string }>();
  const [copied, setCopied] = useState(false);
  const [pending, startTransition] = useTransition();

  function submit(event: FormEvent) {
    event.preventDefault();
    startTransition(async () => {
      const result = await createToken({ name, lifetimeDays });
      if (result.ok) {
        setCreated({ token: result.data.token, name: result.data.name });
        setCopied(false);
        setFieldErrors({});
        setError(undefined);
        setName("");
        return;
      }
      setFieldErrors(result.fieldErrors);
      setError(Object.keys(result.fieldErrors).length ? undefined : result.message);
    });
  }

  async function copyToken(token: string) {
    await navigator.clipboard.writeText(token);
    setCopied(true);
  }

  return (
    <div className="space-y-4">
      {created ? (
        <div
          className="space-y-2 rounded-lg border border-verdigris/40 bg-verdigris-soft p-4"
          data-testid="new-token"
        >
          <p className="text-sm font-medium">
            Token “{created.name}” — copy it now; Partita keeps only a fingerprint of it and cannot
            show it again.
          </p>
          <code className="block overflow-x-auto rounded bg-white px-3 py-2 font-mono text-sm break-all select-all">
            {created.token}
          </code>
          <Button type="button" tone="quiet" onClick={() => copyToken(created.token)}>
            {copied ? "Copied" : "Copy token"}
          </Button>
        </div>
      ) : null}
      <form
        onSubmit={submit}
        noValidate
        className="space-y-4 rounded-lg border border-ink/10 bg-white p-5"
      >
        <h2 className="font-semibold">New token</h2>
        {error ? <Notice tone="error">{error}</Notice> : null}
        <Field
          label="Name"
          name="token-name"
          value={name}
          onChange={(event) => setName(event.target.value)}
          error={fieldErrors.name}
          hint="Say where it is used, e.g. “nightly shard check”."
          maxLength={80}
          required
        />
        <div className="space-y-1">
          <label htmlFor="token-lifetime" className="block text-sm font-medium">
            Expires after
          </label>
          <select
            id="token-lifetime"
            value={lifetimeDays}
            onChange={(event) => setLifetimeDays(Number(event.target.value))}
            className="block w-full rounded-md border border-ink/20 bg-white px-3 py-2 text-sm"
          >
            {TOKEN_LIFETIME_DAYS.map((days) => (
              <option key={days} value={days}>
                {days} days
              </option>
            ))}
          </select>
          {fieldErrors.lifetimeDays ? (
            <p className="text-xs text-cadmium">{fieldErrors.lifetimeDays}</p>
          ) : null}
        </div>
        <Button type="submit" disabled={pending}>
          {pending ? "Creating…" : "Create token"}
        </Button>
      </form>
    </div>
  );
}
