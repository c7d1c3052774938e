import type { ButtonHTMLAttributes } from "react";

type Tone = "primary" | "quiet" | "danger";

const TONES: Record<Tone, string> = {
  primary: "bg-ink text-paper hover:bg-ink-soft disabled:bg-ink-faint",
  quiet: "bg-transparent text-ink ring-1 ring-ink/20 hover:bg-paper-deep disabled:text-ink-faint",
  danger: "bg-transparent text-cadmium ring-1 ring-cadmium/40 hover:bg-cadmium-soft",
};

export function buttonClasses(tone: Tone = "primary"): string {
  return `inline-flex items-center justify-center gap-2 rounded-md px-4 py-2 text-sm font-medium transition-colors disabled:cursor-not-allowed ${TONES[tone]}`;
}

export function Button({
  tone = "primary",
  className = "",
  ...props
}: ButtonHTMLAttributes<HTMLButtonElement> & { tone?: Tone }) {
  return <button className={`${buttonClasses(tone)} ${className}`} {...props} />;
}
