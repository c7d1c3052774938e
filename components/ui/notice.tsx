import type { ReactNode } from "react";

type Tone = "error" | "info" | "success";

const TONES: Record<Tone, string> = {
  error: "border-cadmium/40 bg-cadmium-soft text-ink",
  info: "border-indigo/30 bg-indigo-soft text-ink",
  success: "border-verdigris/40 bg-verdigris-soft text-ink",
};

export function Notice({ tone = "info", children }: { tone?: Tone; children: ReactNode }) {
  return (
    <div
      role={tone === "error" ? "alert" : "status"}
      className={`rounded-md border px-4 py-3 text-sm ${TONES[tone]}`}
    >
      {children}
    </div>
  );
}
