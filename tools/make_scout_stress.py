#!/usr/bin/env python3
"""Synthetic scouting-run stress tables (invented analytes, not measurements) for docs/performance.md: python3 tools/make_scout_stress.py N"""
import math, random, sys
n = int(sys.argv[1]); random.seed(7)
t0=0.5*150*4.6**2/1000/1.0  # Vm mL / flow
tD=0.8
progs=[(10,5,95),(30,5,95)]
params=[(random.uniform(1.0,5.0), None) for _ in range(n)]
params=[(lk, 2.0+0.8*lk+random.uniform(-0.3,0.3)) for lk,_ in params]
for tg,a,b in progs:
    with open(f"s{n}-{tg}.csv","w") as f:
        f.write("# invented: synthetic stress table, not a measurement\nname,rt\n")
        for i,(lk,S) in enumerate(params):
            phi0=a/100; dphi=(b-a)/100
            k0=10**(lk-S*phi0)
            bb=S*dphi*t0/tg
            # elution during dwell? approximate (ignore dwell prior elution)
            kd = tD/t0
            if k0 < kd:
                tr = t0*(1+k0)
            else:
                tr = t0/bb*math.log10(2.3*(k0-kd)*bb+1)+t0+tD
            f.write(f"x{i},{tr:.4f}\n")
