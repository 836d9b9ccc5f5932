// The invented demo scenario: an institute, one group, one person per role, an allocation,
// the loopback cluster and the built-in samplers. Invented names only; demo data, nothing real.
import type { Role } from "../auth/roles";

export const DEMO_INSTITUTE = "Brannock Institute for Theoretical Physics";
export const DEMO_GROUP = { slug: "rg-lattice", name: "Random Geometry & Lattice Group", institute: DEMO_INSTITUTE };

/** Demo sign-ins (also listed in README.md). */
export const DEMO_PEOPLE: { email: string; name: string; role: Role; password: string; member: boolean; isLead?: boolean }[] = [
  { email: "admin@brannock.example", name: "Wren Albescu", role: "admin", password: "demo-admin-pass", member: false },
  { email: "coordinator@brannock.example", name: "Tobiah Kestrane", role: "coordinator", password: "demo-coord-pass", member: false },
  { email: "pi@brannock.example", name: "Ottilie Marrowgate", role: "pi", password: "demo-pi-pass1", member: true, isLead: true },
  { email: "researcher@brannock.example", name: "Sefa Lindqvarn", role: "researcher", password: "demo-research-pass", member: true },
  { email: "viewer@brannock.example", name: "Jory Pennefeather", role: "viewer", password: "demo-viewer-pass", member: true },
];

export const DEMO_ALLOCATION = {
  name: "RGL compute 2026–27",
  periodStart: new Date("2026-10-01T00:00:00Z"),
  periodEnd: new Date("2027-10-01T00:00:00Z"),
  grantCoreHours: 250_000,
  perPersonCapCoreHours: 60_000,
};

export const DEMO_CLUSTER = { name: "tarn-loopback", description: "the loopback fake cluster that runs the built-in samplers" };
