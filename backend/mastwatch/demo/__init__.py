"""The demo: physical-model sweep synthesis and the invented demo club.

models.py   feedpoint impedance models of antennas (dipole, vertical, fan, yagi,
            j-pole, collinear, end-fed, small loop) and the detune modifier
synth.py    synthesize(model, f_start, f_stop, points, feedline=..., damage=...,
            noise=..., seed=...) -> Sweep, with feedline damage (water, breaks,
            mid-line reflections) and seeded measurement noise
club.py     the invented club as plain data (SCENARIO), write_demo_files(),
            load_demo_club(session, settings)
loader.py   loads a scenario through the records services (the real upload path)
"""
