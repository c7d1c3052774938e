// Mentions match members by "@e-mail" or "@full name" (common practice in comment systems), and
// only whole handles: the cases below are written out by hand.
import { describe, expect, it } from "vitest";
import { findMentionedMembers } from "@/lib/reviews/mentions";

const members = [
  { userId: "1", name: "Ana Lima", email: "ana@orchard.example" },
  { userId: "2", name: "Anabel", email: "anabel@orchard.example" },
  { userId: "3", name: null, email: "kit@orchard.example" },
];
const ids = (body: string) => findMentionedMembers(body, members).map((member) => member.userId);

describe("findMentionedMembers", () => {
  it("finds members by full name (with spaces) and by e-mail, ignoring case", () => {
    expect(ids("@ana lima could you check this?")).toEqual(["1"]);
    expect(ids("cc @KIT@orchard.example.")).toEqual(["3"]);
    expect(ids("@Anabel and @Ana Lima")).toEqual(["1", "2"]);
  });

  it("does not match a longer name, an address inside a word, or a bare name", () => {
    expect(ids("@Anabelle said so")).toEqual([]);
    expect(ids("mail ana@orchard.example directly")).toEqual([]);
    expect(ids("Ana Lima agrees")).toEqual([]);
    expect(ids("@ana@orchard.example-archive")).toEqual([]);
  });

  it("treats names as text, not as patterns", () => {
    const tricky = [{ userId: "9", name: "A.B (ops)", email: "ab@x.example" }];
    expect(findMentionedMembers("hi @A.B (ops)!", tricky)).toHaveLength(1);
    expect(findMentionedMembers("hi @AxB (ops)!", tricky)).toHaveLength(0);
  });
});
