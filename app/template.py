"""The project that File > New starts from: a plain subsonic pitot nacelle to edit."""

from __future__ import annotations

from engine_air.project.model import Case, Envelope, Grid, Inlet, Limits, Project, Rating


def new_project() -> Project:
    return Project(
        title="New inlet study",
        notes="",
        limits=Limits(face_mach_max=0.6, throat_mach_max=0.8),
        inlet=Inlet(type="pitot", capture_area_m2=1.0, throat_area_m2=0.85, face_area_m2=0.95,
                    duct_loss_coefficient=0.03, lip_suction_factor=0.8),
        ratings=(Rating(name="max", theta=(0.8, 1.0, 1.2), corrected_flow_kg_s=(120.0, 120.0, 110.0)),),
        envelope=Envelope(mach=(0.1, 0.85, 0.85, 0.3), altitude_m=(0.0, 0.0, 12000.0, 12000.0)),
        grid=Grid(mach_points=81, altitude_points=61),
        cases=(Case(name="ISA, max", rating="max", isa_offset_K=0.0),),
    )
