export * from "./auth";
export * from "./workspaces";
export * from "./analyses";
