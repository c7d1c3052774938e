import { BearerSecretKind } from "./bearer-secret";

/**
 * Federated client keys: `prck_…`, distinct from the API tokens' `prtk_`, so the API's token
 * guard refuses a client key before asking the database and a client key can never act as a person.
 */
export const CLIENT_KEYS = new BearerSecretKind("prck_");
export const CLIENT_KEY_PREFIX = CLIENT_KEYS.prefix;
