"""Physical constants and reference states used throughout eqconv (SI units).

References
----------
.. [1] CODATA 2018 recommended values (exact SI definitions for R).
"""

from __future__ import annotations

#: Molar gas constant [J/(mol K)] (CODATA 2018, exact).
R: float = 8.314462618
#: Reference temperature of formation data [K].
T_REF: float = 298.15
#: Standard pressure, IUPAC since 1982 [Pa].
P_BAR: float = 1.0e5
#: Standard atmosphere [Pa] (older standard pressure of many tables).
P_ATM: float = 101325.0
