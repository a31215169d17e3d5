// The invented demo scenario: a small spa-care service, "Lantern Bay Spa Care",
// with one technician, one admin and two owners with three tubs between them.
// Every name, address and value here is made up for the demo.
export const DEMO_PASSWORD = "dipwell-demo";

export const DEMO_USERS = [
  { key: "admin", name: "Sage (demo admin)", email: "admin@lanternbay.test", role: "admin" },
  { key: "tech", name: "Rowan (demo technician)", email: "rowan.tech@lanternbay.test", role: "technician" },
  { key: "ash", name: "Ash (demo owner)", email: "ash.owner@lanternbay.test", role: "owner" },
  { key: "birch", name: "Birch (demo owner)", email: "birch.owner@lanternbay.test", role: "owner" },
] as const;

export type DemoUserKey = (typeof DEMO_USERS)[number]["key"];

export const DEMO_TUBS = [
  { name: "Garden tub", owner: "ash", volumeLitres: 1200, volumeUnit: "L", sanitiser: "chlorine", timeZone: "Europe/London", sharedWithTech: true, chart: "demo-3pad.json" },
  { name: "Cabin tub", owner: "ash", volumeLitres: 1514, volumeUnit: "gal", sanitiser: "bromine", timeZone: "Europe/London", sharedWithTech: false, chart: "demo-bromine-4pad.json" },
  { name: "Deck spa", owner: "birch", volumeLitres: 950, volumeUnit: "L", sanitiser: "chlorine", timeZone: "America/Vancouver", sharedWithTech: true, chart: "demo-6pad.json" },
] as const;
