"""Train descriptions, train files, kinematics, planning and design (the train stage of the flow)."""
