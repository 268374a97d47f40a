#!/usr/bin/python3
"""Regenerate minsec_timedelta.csv.

Made with the Python 3.11 standard library (datetime, csv), run as
/usr/bin/python3 from this folder:

    /usr/bin/python3 gen_minsec.py

For whole numbers of seconds below one day it records
str(datetime.timedelta(seconds=s)), which prints h:mm:ss ("0:03:07",
"1:02:03"). FormatMinSec must print the same from one hour on and the same
without the leading "0:" below one hour.
"""
import csv
import datetime

secs = [0, 1, 9, 10, 59, 60, 61, 187, 599, 600, 3599, 3600, 3601, 3661,
        3723, 7199, 7200, 36000, 45296, 86399]
with open("minsec_timedelta.csv", "w", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["seconds", "timedelta"])
    for s in secs:
        w.writerow([s, str(datetime.timedelta(seconds=s))])
