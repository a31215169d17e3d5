import { type RouteConfig, index, layout, route } from "@react-router/dev/routes";

// Route modules live in folders by the resource their URL names (tubs, charts, clients,
// notifications, admin, auth); every JSON endpoint lives in routes/api/ and answers
// anonymous requests with 401 itself.
export default [
  index("routes/home.tsx"),

  // Signing in and out (public)
  route("sign-in", "routes/auth/sign-in.tsx"),
  route("sign-up", "routes/auth/sign-up.tsx"),
  route("check-email", "routes/auth/check-email.tsx"),
  route("forgot-password", "routes/auth/forgot-password.tsx"),
  route("reset-password", "routes/auth/reset-password.tsx"),
  route("sign-out", "routes/auth/sign-out.ts"),

  // JSON endpoints
  route("api/auth/*", "routes/api/auth.ts"),
  route("api/chart-versions/:versionId", "routes/api/chart-version.ts"),
  route("api/chart-photos/:photoId", "routes/api/chart-photo.ts"),
  route("api/chart-batches/:batchId/uploads", "routes/api/chart-batches.uploads.ts"),
  route("api/chart-batches/:batchId/photos", "routes/api/chart-batches.photos.ts"),
  route("api/tubs/:tubId/uploads", "routes/api/tubs.uploads.ts"),
  route("api/tubs/:tubId/photos", "routes/api/tubs.photos.ts"),
  route("api/tubs/:tubId/readings/:readingId", "routes/api/tubs.reading-status.ts"),
  route("api/tubs/:tubId/trends", "routes/api/tubs.trends.ts"),
  route("api/water-plan", "routes/api/water-plan.ts"),
  route("api/tubs/:tubId/plan", "routes/api/tubs.plan.ts"),

  layout("routes/signed-in-layout.tsx", [
    // Tubs: the owner's, and those shared with a technician
    route("tubs", "routes/tubs/list.tsx"),
    route("tubs/new", "routes/tubs/new.tsx"),
    route("tubs/:tubId", "routes/tubs/detail.tsx"),
    route("tubs/:tubId/edit", "routes/tubs/edit.tsx"),
    route("tubs/:tubId/sharing", "routes/tubs/sharing.tsx"),
    route("tubs/:tubId/notes", "routes/tubs/notes.tsx"),
    route("tubs/:tubId/read", "routes/tubs/read.tsx"),
    route("tubs/:tubId/readings/:readingId", "routes/tubs/reading.tsx"),
    route("tubs/:tubId/readings/:readingId/crops/:analyte", "routes/tubs/reading-crop.ts"),
    route("tubs/:tubId/photos/:photoId", "routes/tubs/photo.ts"),
    route("tubs/:tubId/history", "routes/tubs/history.tsx"),
    route("tubs/:tubId/history.csv", "routes/tubs/history-csv.ts"),
    route("tubs/:tubId/report", "routes/tubs/report.tsx"),
    route("tubs/:tubId/trends", "routes/tubs/trends.tsx"),
    route("tubs/:tubId/plan", "routes/tubs/plan.tsx"),
    route("tubs/:tubId/treatments", "routes/tubs/treatments.tsx"),
    route("tubs/:tubId/setup", "routes/tubs/setup.tsx"),
    route("products", "routes/products/list.tsx"),

    // A technician's clients, review queue and invitations
    route("clients", "routes/clients/list.tsx"),
    route("clients/review", "routes/clients/review.tsx"),
    route("invitations/:token", "routes/clients/invitations.tsx"),

    // Strip charts (technicians and admins)
    route("charts", "routes/charts/list.tsx"),
    route("charts/:chartId", "routes/charts/chart.tsx"),
    route("charts/:chartId/batches/:batchId/calibrate", "routes/charts/calibrate.tsx"),

    // Notifications and their settings
    route("notifications", "routes/notifications/list.tsx"),
    route("settings/notifications", "routes/notifications/settings.tsx"),

    // Admin
    route("admin/users", "routes/admin/users.tsx"),
    route("admin/email", "routes/admin/email.tsx"),
    route("dev/inbox", "routes/admin/inbox.tsx"),
  ]),

  route("unsubscribe/:token/:kind", "routes/notifications/unsubscribe.tsx"),
  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
