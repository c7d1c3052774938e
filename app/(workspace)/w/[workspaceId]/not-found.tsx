import { LostPage } from "@/components/navigation/lost-page";

/**
 * An unknown report, analysis or page inside a workspace the visitor belongs to; the workspace's
 * header and navigation stay around it. (Next gives not-found pages no route parameters, so the
 * header's links are the way back to this workspace.)
 */
export default function WorkspaceNotFound() {
  return (
    <LostPage
      links={[{ href: "/", label: "Your workspaces" }]}
      reasons={[
        "The link may be mistyped or cut short.",
        "The report or analysis may have been deleted; a deleted report takes all its versions.",
      ]}
    />
  );
}
