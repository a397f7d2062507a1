"""The README's crank-rocker four-bar from Python: one position and velocity,
then a full turn of the crank. Run: /usr/bin/python3 examples/python_fourbar.py
after building into build/ (it uses the package the build assembled there;
an installed kinloop needs only the import)."""
import math
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), os.pardir,
                                "build", "bindings", "python"))
import kinloop as kl  # noqa: E402  (found through the line above)

with kl.Model() as m:
    crank, coupler, rocker = m.add_link("crank"), m.add_link("coupler"), m.add_link("rocker")
    motor = m.add_revolute(kl.GROUND, (0, 0), crank, (0, 0))  # pin at the origin
    m.add_revolute(crank, (40, 0), coupler, (0, 0))
    m.add_revolute(coupler, (120, 0), rocker, (80, 0))
    m.add_revolute(rocker, (0, 0), kl.GROUND, (100, 0))
    tip = m.add_point(coupler, (60, 30), "tip")
    m.add_input(motor)
    m.finalize()  # checks topology, finds the loop
    s = kl.Solver(m)
    s.set_link_angle(coupler, 0.3)  # sketch: picks the branch
    s.set_link_angle(rocker, 1.5)
    s.solve_position(1.0)
    s.solve_velocity(2.0)
    print("rocker %.4f rad, %.4f rad/s" % (s.link_angle(rocker), s.link_rate(rocker)))
    turn = s.sweep(0, 0.0, 2 * math.pi, 72)  # numpy arrays, one row per step
    swing = turn.link_angle[:, rocker]
    print("rocker swings %.2f deg; tip x from %.1f to %.1f"
          % (math.degrees(swing.max() - swing.min()), turn.point_x[:, tip].min(),
             turn.point_x[:, tip].max()))
