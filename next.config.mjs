/** @type {import('next').NextConfig} */
const nextConfig = {
  poweredByHeader: false,
  reactStrictMode: true,
  // Server-side packages with native parts or dynamic requires stay outside the bundle.
  serverExternalPackages: ["sequelize", "pg", "pg-hstore", "pg-copy-streams", "pg-boss", "ssh2", "cpu-features", "pino", "bcryptjs", "nodemailer"],
  typescript: { tsconfigPath: "tsconfig.json" },
};
export default nextConfig;
