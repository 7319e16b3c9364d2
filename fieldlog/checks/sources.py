"""Where each pass mark comes from, as printed beside it.

The fourteen checks are those of the DCMA 14-point assessment (DCMA-EA PAM 200.1, Earned
Value Management System Program Analysis Pamphlet, Defense Contract Management Agency, 2012).
The GAO Schedule Assessment Guide (GAO-16-89G, December 2015), page "DOD Defense Contract
Management Agency", lists the same fourteen and the 5% mark for missing logic. The other
marks were read in several published summaries of the pamphlet that agree with each other,
not in the pamphlet's own text; a few were recalled rather than read and are marked so.
"""

from __future__ import annotations

DCMA_GAO = "DCMA 14-point, as given in GAO-16-89G"
DCMA_SECONDARY = "DCMA 14-point (DCMA-EA PAM 200.1), widely cited mark"
DCMA_RECALLED = "DCMA 14-point (DCMA-EA PAM 200.1), mark recalled, not read"
DAU_CPLI = "CPLI as defined by DAU Acquipedia; 0.95 widely cited DCMA mark"
BEI_SHEET = "BEI as in published schedule-metric sheets; 0.95 widely cited DCMA mark"
