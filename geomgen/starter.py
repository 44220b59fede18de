"""The commented starter spec written by ``geomgen new`` (it builds as written)."""

STARTER = '''\
# geomgen spec, format 1. Lengths in mm, angles in degrees.
# Datum frame: x aft, y to starboard, z up. Positive incidence and twist raise the leading edge.
format = 1
name = "starter"                       # used in output file names

[datum]
origin = "where the mast's leading edge meets the top of the fuselage, on the centreline"

# Named sections, used by stations. A NACA 4- or 5-digit designation, or file = "x.dat"
# (a coordinate file next to this spec). Options: thickness_pct, invert, closed_te.
[sections.wing-root]
naca = "2412"
[sections.wing-tip]
naca = "2410"
[sections.stab]
naca = "2409"
invert = true                          # a stabilizer's pressure side is on top

[[surface]]
name = "front-wing"
role = "wing"                          # wing | stabilizer | mast | fin
mirror = true                          # stations describe the starboard half
position = [-220.0, 0.0, -30.0]        # datum position of the root reference point
reference = 0.25                       # twist axis at the quarter chord
incidence = 1.0
te_thickness = 0.6                     # finished trailing edge, mm (0 = sharp)
interpolation = "smooth"               # or "linear"
[[surface.station]]
y = 0.0
chord = 170.0
section = "wing-root"
[[surface.station]]
y = 200.0
chord = 145.0
x = 8.0                                # reference point moved aft (sweep)
z = -6.0                               # and down (anhedral)
section = "wing-root"
[[surface.station]]
y = 380.0
chord = 55.0
x = 35.0
z = -24.0
twist = -1.5                           # washout
section = "wing-tip"

[[surface]]
name = "stabilizer"
role = "stabilizer"
mirror = true
position = [420.0, 0.0, -25.0]
incidence = 1.25                       # about 2 % of the weight down at cruise
te_thickness = 0.5
[[surface.station]]
y = 0.0
chord = 90.0
section = "stab"
[[surface.station]]
y = 190.0
chord = 45.0
x = 20.0
section = "stab"

[[surface]]
name = "mast"
role = "mast"
orientation = "vertical-up"            # span runs up +z from the root reference point
position = [0.0, 0.0, 0.0]             # mast leading edge on the fuselage
reference = 0.0
te_thickness = 0.6
[[surface.station]]
y = 0.0
chord = 120.0
section = "mast"
[[surface.station]]
y = 700.0
chord = 120.0
section = "mast"

[sections.mast]
naca = "0013"

# What the balance command needs: total mass on the foil, speeds, water.
[flight]
mass_kg = 80.0
speeds_kmh = [15.0, 20.0, 24.0]
fluid = "seawater"
cruise_kmh = 20.0                      # where the rider stands and the shim is solved
ride_height_mm = 150.0                 # board above the still water: the free surface
rider_from_mast_mm = -210.0            # the rider's weight, 21 cm ahead of the mast
'''
