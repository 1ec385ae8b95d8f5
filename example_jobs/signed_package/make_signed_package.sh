#!/usr/bin/env bash
# A signed, twice-revised calc package, made from the three revisions of the job file in this folder:
# revision B with its changes since A, revision C with its changes since B, and revision C signed in turn
# by the preparer, the checker and the approver, then verified.
#
# The keys are DEMO keys made here with OpenSSL, self-signed, valid for 30 days, and thrown away with the
# output folder: a real package is signed with the keys your organisation issues.
#
#   bash example_jobs/signed_package/make_signed_package.sh [OUT_DIR]
#
# CALCDOC names the command to run (default: calcdoc).
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
out="${1:-$here/out}"
calcdoc=(${CALCDOC:-calcdoc})
mkdir -p "$out/keys"

for role in prepared checked approved; do
  openssl req -x509 -newkey rsa:2048 -sha256 -nodes -days 30 \
    -keyout "$out/keys/$role.key.pem" -out "$out/keys/$role.cert.pem" \
    -subj "/CN=DEMO ${role^} Engineer (demo key)/O=Demo Engineering" 2>/dev/null
done

"${calcdoc[@]}" run "$here/nitrogen_booster_revA.yaml" --out "$out" --quiet
"${calcdoc[@]}" run "$here/nitrogen_booster_revB.yaml" --changes-since "$here/nitrogen_booster_revA.yaml" --out "$out" --quiet
"${calcdoc[@]}" run "$here/nitrogen_booster_revC.yaml" --changes-since "$here/nitrogen_booster_revB.yaml" --out "$out" --quiet

pdf="$out/DEMO-LT-C-021_revC.pdf"
"${calcdoc[@]}" sign "$pdf" --key "$out/keys/prepared.key.pem" --cert "$out/keys/prepared.cert.pem" \
  --role prepared --out "$out/DEMO-LT-C-021_revC_prepared.pdf"
"${calcdoc[@]}" sign "$out/DEMO-LT-C-021_revC_prepared.pdf" --key "$out/keys/checked.key.pem" \
  --cert "$out/keys/checked.cert.pem" --role checked --out "$out/DEMO-LT-C-021_revC_checked.pdf"
"${calcdoc[@]}" sign "$out/DEMO-LT-C-021_revC_checked.pdf" --key "$out/keys/approved.key.pem" \
  --cert "$out/keys/approved.cert.pem" --role approved --out "$out/DEMO-LT-C-021_revC_signed.pdf"

"${calcdoc[@]}" verify "$out/DEMO-LT-C-021_revC_signed.pdf" --trust "$out/keys/prepared.cert.pem" \
  --trust "$out/keys/checked.cert.pem" --trust "$out/keys/approved.cert.pem"
