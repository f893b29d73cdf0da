/** @type {import('next').NextConfig} */
const nextConfig = {
  serverExternalPackages: ['knex', 'pg', 'pg-boss'],
  allowedDevOrigins: ['127.0.0.1'],
  poweredByHeader: false,
};
export default nextConfig;
