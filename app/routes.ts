import { type RouteConfig, index, route } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),
  route("sign-in", "routes/sign-in.tsx"),
  route("auth/github", "routes/auth.github.tsx"),
  route("auth/github/callback", "routes/auth.github.callback.tsx"),
  route("sign-out", "routes/sign-out.tsx"),
  route("teams/new", "routes/teams.new.tsx"),
  route("teams/:teamId", "routes/team.tsx"),
  route("projects/:projectId", "routes/project.tsx"),
  route("effects/:effectId", "routes/effect.tsx"),
  route("effects/:effectId/document.json", "routes/effect.document.ts"),
  route("effects/:effectId/export.zip", "routes/effect.export.ts"),
  route("projects/:projectId/export.zip", "routes/project.export.ts"),
  route("sprites/:spriteId/image.png", "routes/sprite.image.ts"),
  route("dev/mailbox", "routes/dev.mailbox.tsx"),
  route("healthz", "routes/healthz.ts"),
  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
