// Ids in URLs and forms are UUIDs (PostgreSQL's gen_random_uuid). Anything else is "not found"
// before it reaches a query, which would otherwise fail on the cast.
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export function isUuid(id: unknown): id is string {
  return typeof id === "string" && UUID.test(id);
}
