export * from "./auth";
export * from "./workspaces";
export * from "./analyses";
export * from "./api-tokens";
export * from "./reviews";
export * from "./mail-outbox";
export * from "./federated";
export * from "./layout-plans";
