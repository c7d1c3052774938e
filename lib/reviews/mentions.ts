export interface MentionableMember {
  userId: string;
  name: string | null;
  email: string;
}

function escapeForPattern(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
}

/**
 * The members a comment mentions: `@` followed by a member's e-mail address or full name, case
 * insensitive, ending at a character that cannot continue a name (so "@Ana" does not match "Anabel").
 * Matching against the member list, rather than parsing names out of the text, lets names hold
 * spaces and keeps strangers out: only members can be mentioned.
 */
export function findMentionedMembers<TMember extends MentionableMember>(
  body: string,
  members: readonly TMember[],
): TMember[] {
  return members.filter((member) =>
    [member.email, member.name]
      .filter((handle): handle is string => Boolean(handle?.trim()))
      .some((handle) =>
        new RegExp(`(^|[^\\w@])@${escapeForPattern(handle.trim())}(?![\\w@-])`, "iu").test(body),
      ),
  );
}
