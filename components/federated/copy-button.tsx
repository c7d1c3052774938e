"use client";

import { useState } from "react";
import { Button } from "@/components/ui/button";

/** Copies a text to the clipboard and says so. */
export function CopyButton({ text, label }: { text: string; label: string }) {
  const [copied, setCopied] = useState(false);
  return (
    <Button
      type="button"
      tone="quiet"
      onClick={async () => {
        await navigator.clipboard.writeText(text);
        setCopied(true);
      }}
    >
      {copied ? "Copied" : label}
    </Button>
  );
}
