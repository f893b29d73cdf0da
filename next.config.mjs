/** @type {import('next').NextConfig} */
const nextConfig = {
  serverExternalPackages: ['knex', 'pg', 'pg-boss', 'pg-query-stream', 'exceljs'],
  allowedDevOrigins: ['127.0.0.1'],
  poweredByHeader: false,
};
export default nextConfig;
