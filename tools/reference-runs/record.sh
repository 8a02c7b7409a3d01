#!/usr/bin/env bash
# Records reference energies of a fixed set of runs (JSON) into DIR, with binary BIN.
set -u
BIN=${1:?bin}; OUT=${2:?outdir}; mkdir -p "$OUT"
G=tests/data/gw100
run() { name=$1; shift; "$BIN" "$@" --json > "$OUT/$name.json" 2> "$OUT/$name.err"; echo "$name rc=$?"; }
run scf-water $( echo scf $G/water.xyz --basis cc-pVDZ )
run scf-n2 scf $G/nitrogen.xyz --basis cc-pVDZ
run scf-benzene scf $G/benzene.xyz --basis 6-31G*
run scf-water-uhf scf $G/water.xyz --basis cc-pVDZ --charge 1 --multiplicity 2
for m in koopmans dscf ep2 eom-ccsd eom-mp2; do
  run ion-water-$m ionize $G/water.xyz --basis cc-pVDZ --method $m
  run ion-n2-$m ionize $G/nitrogen.xyz --basis cc-pVDZ --method $m
done
for m in koopmans ep2 eom-mp2; do run ion-benzene-$m ionize $G/benzene.xyz --basis 6-31G* --method $m --count 4; done
run ion-water-default ionize $G/water.xyz --basis cc-pVDZ
run core-water core $G/water.xyz --basis cc-pVDZ
run core-water-mp2 core $G/water.xyz --basis cc-pVDZ --mp2
run core-n2 core $G/nitrogen.xyz --basis cc-pVDZ --quick
run core-benzene core $G/benzene.xyz --basis sto-3g --quick
run spec-demo spectrum molecules/ethylene-carbonate.xyz molecules/dimethyl-carbonate.xyz molecules/fluoroethylene-carbonate.xyz:0.2 --basis sto-3g --region core --element C --quick --photon alka
run spec-water spectrum $G/water.xyz --basis cc-pVDZ --photon he2
