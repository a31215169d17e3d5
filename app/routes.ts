import { type RouteConfig, index, layout, route } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),
  route("sign-in", "routes/auth/sign-in.tsx"),
  route("sign-up", "routes/auth/sign-up.tsx"),
  route("check-email", "routes/auth/check-email.tsx"),
  route("forgot-password", "routes/auth/forgot-password.tsx"),
  route("reset-password", "routes/auth/reset-password.tsx"),
  route("sign-out", "routes/auth/sign-out.ts"),
  route("api/auth/*", "routes/api/auth.ts"),

  layout("routes/signed-in-layout.tsx", [
    route("tubs", "routes/tubs/list.tsx"),
    route("tubs/:tubId", "routes/tubs/detail.tsx"),
    route("dev/inbox", "routes/dev/inbox.tsx"),
  ]),

  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
