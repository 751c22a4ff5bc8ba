"""Physical constants, one place for every layer (SI units).

References
----------
.. [1] BIPM, *The International System of Units (SI)*, 9th ed., 2019 (c exact; μ0 = 4π×10⁻⁷ H/m was
   exact before 2019 and differs from the CODATA 2018 value by 5×10⁻¹⁰ relative).
.. [2] CODATA 2018 recommended values (ε0).
.. [3] 3rd CGPM, 1901 (standard acceleration of gravity).
"""

import math

SPEED_OF_LIGHT_M_S = 299_792_458.0  # exact, SI definition of the metre
MU0 = 4e-7 * math.pi  # vacuum permeability [H/m] (classical SI value)
EPS0 = 8.8541878128e-12  # vacuum permittivity [F/m] (CODATA 2018)
ETA0 = MU0 * SPEED_OF_LIGHT_M_S  # free-space wave impedance [ohm]
STANDARD_GRAVITY_M_S2 = 9.80665  # standard acceleration of gravity [m/s²] (CGPM 1901)
FOOT_M = 0.3048  # international foot [m], exact (1959 international yard and pound agreement)
INCH_M = 0.0254  # international inch [m], exact (same agreement)
