import { BearerSecretKind } from "./bearer-secret";

/** Personal API tokens: `prtk_…` (`grep -r prtk_` finds one pasted anywhere). */
export const API_TOKENS = new BearerSecretKind("prtk_");
export const API_TOKEN_PREFIX = API_TOKENS.prefix;
