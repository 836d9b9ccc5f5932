/** @type {import('next').NextConfig} */
const nextConfig = {
  poweredByHeader: false,
  reactStrictMode: true,
  // Server-side packages with native parts or dynamic requires stay outside the bundle.
  serverExternalPackages: ["sequelize", "pg", "pg-hstore", "pg-copy-streams", "pg-boss", "ssh2", "cpu-features", "pino", "bcryptjs", "nodemailer"],
  // The app build checks the app's own sources; tests, benches and scripts are checked by the suite (tests/unit/foundation/typecheck.test.ts).
  typescript: { tsconfigPath: "tsconfig.build.json" },
};
export default nextConfig;
