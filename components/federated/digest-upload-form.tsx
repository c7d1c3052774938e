"use client";

import { useState, useTransition, type FormEvent } from "react";
import { ChoiceOption } from "@/components/analyses/form-controls";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { SelectField } from "@/components/ui/select-field";
import type { ActionResult } from "@/lib/actions/result";
import type { DigestUploadInput } from "@/lib/validation/federated-analysis";

const ROUNDS = [
  {
    value: "schema",
    title: "Round 1: schema digest",
    detail: "What npm run digest -- schema … wrote.",
  },
  {
    value: "gradients",
    title: "Round 2: gradient digest",
    detail: "What npm run digest -- gradients --encoding encoding.json … wrote.",
  },
] as const;

type Round = (typeof ROUNDS)[number]["value"];

/** The largest file the page sends: next.config.mjs's server action body limit, less the JSON. */
const MAX_UPLOAD_BYTES = 7.5 * 1024 * 1024;

/**
 * A digest file of a client without a network path, uploaded by the analyst on its behalf and
 * checked exactly as if the client had sent it. The choices and the file stay after a refusal.
 */
export function DigestUploadForm({
  clients,
  uploadDigest,
}: {
  clients: string[];
  /** The route's action, bound to this analysis. */
  uploadDigest: (input: DigestUploadInput) => Promise<ActionResult<{ repeated: boolean }>>;
}) {
  const [client, setClient] = useState(clients[0] ?? "");
  const [round, setRound] = useState<Round>("schema");
  const [file, setFile] = useState<File | null>(null);
  const [outcome, setOutcome] = useState<{ tone: "error" | "success"; message: string }>();
  const [pending, startTransition] = useTransition();

  function submit(event: FormEvent) {
    event.preventDefault();
    if (!file) {
      setOutcome({ tone: "error", message: "Choose the digest file to upload." });
      return;
    }
    if (file.size > MAX_UPLOAD_BYTES) {
      setOutcome({
        tone: "error",
        message: `${file.name} is ${(file.size / 1024 / 1024).toFixed(1)} MB, more than the page takes (7.5 MB); have the client send it online with its key instead (npm run digest -- --server … --key …).`,
      });
      return;
    }
    startTransition(async () => {
      const text = await file.text();
      const result = await uploadDigest({
        client,
        round,
        fileName: file.name,
        text,
      });
      setOutcome(
        result.ok
          ? {
              tone: "success",
              message: result.data.repeated
                ? `${file.name}: “${client}” had already sent this digest; nothing changed.`
                : `${file.name}: accepted as “${client}”'s ${round === "schema" ? "schema" : "gradient"} digest.`,
            }
          : { tone: "error", message: result.message },
      );
    });
  }

  return (
    <form
      onSubmit={submit}
      noValidate
      className="space-y-3 rounded-lg border border-ink/10 bg-white p-4"
      aria-label="Upload a client's digest file"
    >
      <div className="grid gap-3 md:grid-cols-[1fr_2fr]">
        <SelectField
          id="upload-client"
          name="client"
          label="On behalf of"
          value={client}
          onChange={(event) => setClient(event.target.value)}
        >
          {clients.map((name) => (
            <option key={name} value={name}>
              {name}
            </option>
          ))}
        </SelectField>
        <fieldset className="space-y-1">
          <legend className="text-sm font-medium">Which file</legend>
          <div className="grid gap-2 sm:grid-cols-2">
            {ROUNDS.map((choice) => (
              <ChoiceOption
                key={choice.value}
                name="round"
                value={choice.value}
                checked={round === choice.value}
                onChange={() => setRound(choice.value)}
                title={choice.title}
                detail={choice.detail}
              />
            ))}
          </div>
        </fieldset>
      </div>
      <div className="space-y-1">
        <label htmlFor="digest-file" className="block text-sm font-medium">
          Digest file (JSON)
        </label>
        <input
          id="digest-file"
          type="file"
          accept="application/json,.json"
          className="block text-sm"
          onChange={(event) => setFile(event.target.files?.[0] ?? null)}
        />
      </div>
      <Button type="submit" disabled={pending || !client}>
        {pending ? "Checking…" : "Upload the digest"}
      </Button>
      {outcome ? <Notice tone={outcome.tone}>{outcome.message}</Notice> : null}
    </form>
  );
}
