#!/usr/bin/env bash
# Installs the Debian packages Trenchbook needs when they are missing.
#   ensure-system.sh db     -> PostgreSQL 15 + PostGIS 3, and gdal-bin (ogr2ogr writes the handover package's
#                              shapefiles and GeoPackage): needed to run the product
#   ensure-system.sh test   -> the above plus chromium, gdal-bin and python3-openpyxl (needed by the tests)
# As root it uses apt-get (with apt-get update first); otherwise it stops and says what to install.
set -euo pipefail
want="${1:-db}"
missing=()
have_pkg() { dpkg-query -W -f='${Status}' "$1" 2>/dev/null | grep -q "install ok installed"; }
for p in postgresql-15 postgresql-15-postgis-3 gdal-bin; do have_pkg "$p" || missing+=("$p"); done
if [ "$want" = "test" ]; then
  for p in chromium gdal-bin python3-openpyxl; do have_pkg "$p" || missing+=("$p"); done
fi
[ ${#missing[@]} -eq 0 ] && exit 0
if [ "$(id -u)" -ne 0 ]; then
  echo "trenchbook: missing Debian packages: ${missing[*]}" >&2
  echo "trenchbook: install them as root with: apt-get update && apt-get install -y ${missing[*]}" >&2
  exit 1
fi
echo "trenchbook: installing ${missing[*]} with apt-get"
export DEBIAN_FRONTEND=noninteractive
apt-get update -qq
apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
echo "trenchbook: installed ${missing[*]}"
