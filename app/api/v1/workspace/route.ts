import { respondWithJson, answerApiRequest } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";

/** Who the token acts as: its workspace, the user's current role there, and the token's name. */
export async function GET(request: Request): Promise<Response> {
  return answerApiRequest("caller", async () => {
    const caller = await requireToken(request, "readWorkspace");
    return respondWithJson({
      workspace: { id: caller.workspace.id, name: caller.workspace.name },
      role: caller.workspace.role,
      user: { id: caller.user.id, email: caller.user.email },
      token: { name: caller.tokenName },
    });
  });
}
