/** Workspace roles, from most to least privileged. */
export const ROLES = ["owner", "analyst", "reviewer"] as const;
export type Role = (typeof ROLES)[number];

/**
 * Who may do what. Guards name a capability rather than a role so that a new role (or a change of
 * who may upload) is one edit here, not a hunt through every action.
 */
export const CAPABILITIES = {
  readWorkspace: ["owner", "analyst", "reviewer"],
  manageMembers: ["owner"],
  uploadData: ["owner", "analyst"],
  runAnalysis: ["owner", "analyst"],
  /** Personal API tokens let a pipeline upload and analyse, so only roles that may do so hold them. */
  manageApiTokens: ["owner", "analyst"],
  /** A leaked token must be stoppable even when its holder is away. */
  revokeAnyApiToken: ["owner"],
  /** Those who publish reports ask for their review. */
  requestReview: ["owner", "analyst"],
  /** Everyone in the workspace may discuss a report: reviewers ask, analysts answer. */
  commentOnReport: ["owner", "analyst", "reviewer"],
  /** Sign-off is a reviewer's job; an owner may stand in for one. */
  decideReview: ["owner", "reviewer"],
  /** Deleting a report takes its reviews with it, so it is for those who answer for the workspace. */
  deleteReport: ["owner"],
  /** The record of who decided what is for the people who answer for the workspace. */
  readAuditLog: ["owner"],
} as const satisfies Record<string, readonly Role[]>;

export type Capability = keyof typeof CAPABILITIES;

export function roleAllows(role: Role, capability: Capability): boolean {
  return (CAPABILITIES[capability] as readonly Role[]).includes(role);
}

export const ROLE_LABELS: Record<Role, string> = {
  owner: "Owner",
  analyst: "Analyst",
  reviewer: "Reviewer",
};

export const ROLE_DESCRIPTIONS: Record<Role, string> = {
  owner: "Manages members and settings; can also upload and analyse.",
  analyst: "Uploads datasets and layouts, runs analyses, publishes reports.",
  reviewer: "Reads reports, comments, endorses layouts or returns them for rework.",
};

/** What each capability lets a person do, worded to finish "Only … may …" on a refusal. */
export const CAPABILITY_DESCRIPTIONS: Record<Capability, string> = {
  readWorkspace: "read this workspace",
  manageMembers: "manage members and invitations",
  uploadData: "upload data and start analyses",
  runAnalysis: "start analyses",
  manageApiTokens: "hold API tokens",
  revokeAnyApiToken: "revoke other people's API tokens",
  requestReview: "refer reports for review",
  commentOnReport: "comment on reports",
  decideReview: "endorse or return reports",
  deleteReport: "delete reports",
  readAuditLog: "read the audit log",
};

/** The role names that hold a capability, joined for a sentence: "owners and analysts". */
export function describeHolders(capability: Capability): string {
  const names = (CAPABILITIES[capability] as readonly Role[]).map(
    (role) => `${ROLE_LABELS[role].toLowerCase()}s`,
  );
  return names.length > 1 ? `${names.slice(0, -1).join(", ")} and ${names.at(-1)}` : names[0];
}
