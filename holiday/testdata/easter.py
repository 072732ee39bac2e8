# Makes easter.csv: Western and Orthodox Easter Sunday (Gregorian dates),
# 1899-2150, from python-dateutil's easter module (EASTER_WESTERN and
# EASTER_ORTHODOX; the latter is the Julian computus converted to the
# Gregorian calendar). Run with /usr/bin/python3 easter.py > easter.csv.
import sys
import dateutil
from dateutil.easter import easter, EASTER_WESTERN, EASTER_ORTHODOX

print(f"# python {sys.version.split()[0]}, python-dateutil {dateutil.__version__}, made by easter.py")
print("year,western,orthodox")
for y in range(1899, 2151):
    print(f"{y},{easter(y, EASTER_WESTERN).isoformat()},{easter(y, EASTER_ORTHODOX).isoformat()}")
