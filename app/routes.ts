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
  route("api/tubs/:tubId/uploads", "routes/api/tubs.uploads.ts"),
  route("api/tubs/:tubId/photos", "routes/api/tubs.photos.ts"),
  route("api/tubs/:tubId/trends", "routes/api/tubs.trends.ts"),
  route("api/water-plan", "routes/plan/api-water-plan.ts"),
  route("api/tubs/:tubId/plan", "routes/plan/api-tub-plan.ts"),

  layout("routes/signed-in-layout.tsx", [
    route("tubs", "routes/tubs/list.tsx"),
    route("tubs/:tubId", "routes/tubs/detail.tsx"),
    route("tubs/new", "routes/tubs/new.tsx"),
    route("tubs/:tubId/edit", "routes/tubs/edit.tsx"),
    route("tubs/:tubId/read", "routes/tubs/read.tsx"),
    route("tubs/:tubId/readings/:readingId", "routes/tubs/reading.tsx"),
    route("tubs/:tubId/history", "routes/tubs/history.tsx"),
    route("tubs/:tubId/history.csv", "routes/tubs/history-csv.ts"),
    route("tubs/:tubId/trends", "routes/tubs/trends.tsx"),
    route("tubs/:tubId/photos/:photoId", "routes/tubs/photo.ts"),
    route("tubs/:tubId/photos/:photoId/crop/:analyte", "routes/tubs/photo-crop.ts"),
    route("tubs/:tubId/plan", "routes/plan/tub-plan.tsx"),
    route("tubs/:tubId/treatments", "routes/plan/treatments.tsx"),
    route("tubs/:tubId/setup", "routes/plan/setup.tsx"),
    route("products", "routes/plan/products.tsx"),
    route("dev/inbox", "routes/dev/inbox.tsx"),
  ]),

  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
