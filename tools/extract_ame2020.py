#!/usr/bin/env python3
"""Make data/ame2020_atomic_masses.csv from the AME2020 file mass.mas20.

Source: W.J. Huang, M. Wang, F.G. Kondev, G. Audi, S. Naimi, Chinese Phys. C 45, 030002 (2021)
and M. Wang et al., Chinese Phys. C 45, 030003 (2021), file mass.mas20 (3 Mar 2021).
Only experimental atomic masses are kept (values marked '#' are estimates and are dropped).
Run by hand:  python3 tools/extract_ame2020.py path/to/mass.mas20 > data/ame2020_atomic_masses.csv
"""
import sys

def main(path):
    lines = open(path, encoding="ascii").read().splitlines()
    start = next(i for i, l in enumerate(lines) if l.startswith("0  1    1    0    1  n"))
    print("# Neutral atomic masses, AME2020 (Huang et al., Wang et al., Chinese Phys. C 45, 030002/030003 (2021)),")
    print("# file mass.mas20 dated 3 Mar 2021; experimental values only. Made by tools/extract_ame2020.py.")
    print("Z,A,element,atomic_mass_micro_u,uncertainty_micro_u")
    for line in lines[start:]:
        line = line.ljust(135)
        z = int(line[9:14]); a = int(line[14:19]); el = line[20:23].strip()
        whole = line[106:109].strip(); frac = line[110:123].strip(); unc = line[123:135].strip()
        if "#" in frac or "*" in frac or not whole:
            continue
        micro = int(whole) * 1_000_000 + float(frac)
        print(f"{z},{a},{el},{micro:.6f},{unc}")

if __name__ == "__main__":
    main(sys.argv[1])
