import {
  DECISION_PAST_TENSE,
  DECISION_TITLES,
  type ReviewDecisionKind,
} from "@/lib/reviews/review-state";

export type NotificationMessage = { subject: string; text: string };

const SETTINGS_LINE = (settingsUrl: string) =>
  `You get this e-mail because of your Partita notification settings: ${settingsUrl}`;

type ReportRef = { title: string; version: number; url: string };

const versioned = (report: ReportRef) => `"${report.title}" (version ${report.version})`;

/** Quotes someone's words as a block so they cannot be mistaken for Partita's. */
function quoted(text: string): string {
  return text
    .split("\n")
    .map((line) => `> ${line}`)
    .join("\n");
}

export function reviewRequestedMessage(input: {
  report: ReportRef;
  requesterName: string;
  workspaceName: string;
  note?: string;
  settingsUrl: string;
}): NotificationMessage {
  return {
    subject: `Referred to you: ${input.report.title} (v${input.report.version})`,
    text: [
      `${input.requesterName} referred the report ${versioned(input.report)} in the workspace "${input.workspaceName}" to you.`,
      ...(input.note ? ["", quoted(input.note)] : []),
      "",
      `Read it, comment, and endorse the layout or return it for rework: ${input.report.url}`,
      "",
      "Your decision applies to this version only; a later version needs its own review.",
      "",
      SETTINGS_LINE(input.settingsUrl),
    ].join("\n"),
  };
}

export function decisionMadeMessage(input: {
  report: ReportRef;
  reviewerName: string;
  decision: ReviewDecisionKind;
  reason: string;
  settingsUrl: string;
}): NotificationMessage {
  return {
    subject: `${DECISION_TITLES[input.decision]}: ${input.report.title} (v${input.report.version})`,
    text: [
      `${input.reviewerName} read the report ${versioned(input.report)} and ${DECISION_PAST_TENSE[input.decision]}.`,
      "",
      "Reason:",
      quoted(input.reason),
      "",
      `The report and its review: ${input.report.url}`,
      "",
      SETTINGS_LINE(input.settingsUrl),
    ].join("\n"),
  };
}

export function mentionedMessage(input: {
  report: ReportRef;
  authorName: string;
  body: string;
  settingsUrl: string;
}): NotificationMessage {
  return {
    subject: `${input.authorName} mentioned you on ${input.report.title} (v${input.report.version})`,
    text: [
      `${input.authorName} mentioned you in a comment on the report ${versioned(input.report)}:`,
      "",
      quoted(input.body),
      "",
      `Reply on the report: ${input.report.url}`,
      "",
      SETTINGS_LINE(input.settingsUrl),
    ].join("\n"),
  };
}

export function analysisEndedMessage(input: {
  title: string;
  outcome: "succeeded" | "failed";
  minutes: number;
  url: string;
  failureMessage?: string;
  settingsUrl: string;
}): NotificationMessage {
  const took = `after ${input.minutes.toFixed(1)} minutes`;
  if (input.outcome === "succeeded") {
    return {
      subject: `Analysis finished: ${input.title}`,
      text: [
        `Your analysis "${input.title}" finished ${took}. Its report is ready:`,
        "",
        input.url,
        "",
        SETTINGS_LINE(input.settingsUrl),
      ].join("\n"),
    };
  }
  return {
    subject: `Analysis failed: ${input.title}`,
    text: [
      `Your analysis "${input.title}" stopped ${took} without a report.`,
      ...(input.failureMessage ? ["", quoted(input.failureMessage)] : []),
      "",
      `Details and a way to run it again: ${input.url}`,
      "",
      SETTINGS_LINE(input.settingsUrl),
    ].join("\n"),
  };
}
