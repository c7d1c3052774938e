export * from "./auth";
export * from "./workspaces";
