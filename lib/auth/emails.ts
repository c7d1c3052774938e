import type { Role } from "./roles";
import { ROLE_LABELS } from "./roles";

type Message = { subject: string; text: string };

export function signInLinkMessage(url: string): Message {
  return {
    subject: "Your Partita sign-in link",
    text: [
      "Use this link to sign in to Partita:",
      "",
      url,
      "",
      "It works once and expires in 24 hours. If you did not ask for it, ignore this e-mail.",
    ].join("\n"),
  };
}

export function confirmAddressMessage(url: string): Message {
  return {
    subject: "Confirm your address for Partita",
    text: [
      "Someone, hopefully you, asked for a Partita account with this e-mail address.",
      "Confirm the address to create the account:",
      "",
      url,
      "",
      "The link works once and expires in 24 hours. If you did not sign up, ignore this e-mail:",
      "no account exists until the link is followed.",
    ].join("\n"),
  };
}

export function invitationMessage(input: {
  url: string;
  workspaceName: string;
  inviterName: string;
  role: Role;
  expiresAt: Date;
}): Message {
  return {
    subject: `${input.inviterName} invited you to ${input.workspaceName} on Partita`,
    text: [
      `${input.inviterName} invited you to join the workspace "${input.workspaceName}" as ${ROLE_LABELS[input.role].toLowerCase()}.`,
      "",
      "Partita measures how different the shards of a partitioned dataset are and advises whether",
      "local updates or large minibatches suit the split.",
      "",
      `Accept the invitation: ${input.url}`,
      "",
      `The link works once and expires on ${input.expiresAt.toUTCString()}.`,
    ].join("\n"),
  };
}
