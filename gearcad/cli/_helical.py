"""``gearcad pair --helix``: the helical pair's figures in the normal and transverse sections."""

from __future__ import annotations

import argparse
import dataclasses
import math

from ._format import fmt, table

__all__ = ["add_helix_options", "wants_helix", "run_helical", "helical_to_dict", "render_helical"]


def add_helix_options(p: argparse.ArgumentParser) -> None:
    """``--helix``, ``--hand``, ``--herringbone`` and ``--gap``."""
    p.add_argument("--helix", type=float, metavar="DEG",
                   help="helix angle at the reference cylinder, degrees (0 to below 45): a helical pair; the module, "
                        "pressure angle and shifts are then the normal section's")
    p.add_argument("--hand", choices=("left", "right"), default=None,
                   help="hand of gear 1's helix (default right); gear 2 of an external pair has the other")
    p.add_argument("--herringbone", action="store_true",
                   help="two halves of opposite hand meeting mid-face: no axial force on the shafts (needs --helix)")
    p.add_argument("--gap", type=float, default=0.0, metavar="MM",
                   help="herringbone: gap between the halves, mm (default 0)")


def wants_helix(args: argparse.Namespace) -> bool:
    """True when any helix option was given (they are checked by :func:`run_helical`)."""
    return args.helix is not None or args.herringbone or args.hand is not None or bool(args.gap)


def _check_options(args: argparse.Namespace, z2: int) -> tuple[float, str]:
    from ..errors import InputError
    from ..meshes.helical import check_helix

    if args.helix is None:
        raise InputError("--hand, --herringbone and --gap describe a helix: give the helix angle with --helix DEG")
    helix = check_helix(args.helix, "helix angle (--helix)")
    if args.herringbone and helix == 0:
        raise InputError("--herringbone needs a helix angle above 0 degrees")
    gap = args.gap
    if not (math.isfinite(gap) and gap >= 0):
        raise InputError(f"herringbone gap must be 0 mm or more, got {gap!r}")
    if gap and not args.herringbone:
        raise InputError("--gap applies to a herringbone pair only (add --herringbone)")
    return helix, args.hand or "right"


def face_width(args: argparse.Namespace, normal_module: float) -> float:
    """The face width for the overlap ratio and the rating: --face-width or 10 normal modules (common practice)."""
    from ..errors import InputError
    from ..validate import positive

    width = positive(args.face_width, "face width", "mm") if args.face_width is not None else 10 * normal_module
    if args.herringbone and args.gap >= width:
        raise InputError(f"herringbone gap {args.gap:g} mm must be narrower than the face width {width:g} mm")
    return width


def run_helical(args: argparse.Namespace, system, z1: int, z2: int, show) -> int:
    """Build, check and show a helical pair; ``show`` is ``pair._show``."""
    from ..meshes.checks import analyse_pair
    from ..meshes.helical import hand_findings, helical_mesh, in_normal_terms, make_helical_pair, overlap_finding

    helix, hand = _check_options(args, z2)
    if z2 < 0:
        return _run_internal(args, system, z1, -z2, helix, hand, show)
    if args.cutter_teeth is not None or args.cutter_shift:
        from ..errors import InputError

        raise InputError("--cutter-teeth and --cutter-shift apply to a ring gear only (give z2 negative)")
    width = face_width(args, args.module)
    pair = make_helical_pair(z1, z2, args.module, system, helix, hand, shifts=tuple(args.shift) if args.shift else None,
                             centre=args.centre, backlash=args.backlash, centre_allowance=args.centre_allowance,
                             shorten_tips=not args.full_tips)
    analysis = analyse_pair(pair)
    if helix == 0:  # exactly the spur pair, its table and keys, plus the helix keys in JSON
        return show(args, pair, analysis, lambda a: {**_spur_dict(a), **_zero_helix_keys(a)}, _spur_render())
    helix_width = (width - args.gap) / 2 if args.herringbone else width
    mesh = helical_mesh(pair, analysis.contact_ratio, analysis.backlash, helix_width)
    extra = [*hand_findings(pair.gear1.hand, pair.gear2.hand), overlap_finding(mesh)]
    analysis = in_normal_terms(analysis)
    analysis = dataclasses.replace(analysis, findings=(*analysis.findings, *extra))
    info = {"mesh": mesh, "herringbone": args.herringbone, "gap": args.gap, "face_width": width}
    return show(args, pair, analysis, lambda a: helical_to_dict(a, info), lambda a, r=None: render_helical(a, info, r))


def _run_internal(args: argparse.Namespace, system, z1: int, z2: int, helix: float, hand: str, show) -> int:
    """A helical pinion in a helical ring (same hand): figures and checks of the transverse section."""
    from ..errors import InputError
    from ..meshes.internal import analyse_internal_pair
    from ..meshes.helical import hand_findings, helical_mesh, in_normal_terms, make_helical_internal_pair, overlap_finding
    from ._pairview import internal_to_dict, render_internal

    if args.centre is not None:
        raise InputError("--centre is not available for an internal pair; give the shifts with --shift X1 X2")
    if args.herringbone:
        raise InputError("--herringbone is available for external pairs only (a herringbone ring cannot be cut "
                         "by one shaper cutter)")
    if args.torque is not None or args.power is not None:
        raise InputError("the load rating of a helical internal pair is not available yet; leave out --torque/--power")
    pair = make_helical_internal_pair(z1, z2, args.module, system, helix, hand,
                                      shifts=tuple(args.shift) if args.shift else None, backlash=args.backlash,
                                      centre_allowance=args.centre_allowance, shorten_tips=not args.full_tips,
                                      cutter_teeth=args.cutter_teeth, cutter_shift=args.cutter_shift)
    analysis = analyse_internal_pair(pair)
    if helix == 0:
        return show(args, pair, analysis, lambda a: {**internal_to_dict(a), **_zero_helix_keys(a)}, render_internal)
    width = face_width(args, args.module)
    mesh = helical_mesh(pair, analysis.contact_ratio, analysis.backlash, width)
    analysis = in_normal_terms(analysis)
    extra = [*hand_findings(pair.pinion.hand, pair.pinion.hand, internal=True), overlap_finding(mesh)]
    analysis = dataclasses.replace(analysis, findings=(*analysis.findings, *extra))

    def to_dict(a) -> dict:
        data = internal_to_dict(a)
        pin, ring = data["gears"]
        scale = 1 / math.cos(mesh.helix_angle)
        data.update(_helical_keys(mesh, width, False, 0.0), module=mesh.normal_module,
                    pressure_angle=math.degrees(mesh.normal_pressure_angle),
                    centre_modification=a.pair.centre_modification * scale, normal_backlash=mesh.normal_backlash)
        for entry, fig, lead, z_n, x_n in zip((pin, ring), a.gears, mesh.leads, mesh.virtual_teeth, mesh.normal_shifts):
            entry.update({"module": mesh.normal_module, "shift": x_n, "transverse_shift": fig.gear.shift,
                          "lead": lead, "hand": mesh.hands[0], "virtual_teeth": z_n,
                          "tip_shortening": fig.gear.tip_shortening * scale})
        if pin.get("min_shift") is not None:
            pin["min_shift"] = a.gears[0].min_shift * scale
        return data

    def render(a, rating=None) -> str:
        head = (f"Helical internal pair {z1} : {z2} (ring)   normal module {mesh.normal_module:g} mm   normal pressure angle "
                f"{math.degrees(mesh.normal_pressure_angle):g} deg   helix {math.degrees(mesh.helix_angle):g} deg, "
                f"both {mesh.hands[0]}-hand")
        rows = [("transverse module", f"{fmt(mesh.transverse_module)} mm"),
                ("transverse pressure angle", f"{math.degrees(mesh.transverse_pressure_angle):.4f} deg"),
                ("normal profile shifts x_n (ISO sign)", f"{mesh.normal_shifts[0]:+.4f} / {mesh.normal_shifts[1]:+.4f}"),
                ("leads, pinion / ring", f"{fmt(mesh.leads[0], 3)} / {fmt(mesh.leads[1], 3)} mm"),
                ("face width", f"{width:g} mm"),
                ("overlap ratio", f"{mesh.overlap_ratio:.4f}"),
                ("total contact ratio", f"{mesh.total_contact_ratio:.4f}")]
        body = render_internal(a, rating)
        return "\n".join([head, "", table(rows, header=("helix", "")), "",
                          "the transverse section (figures in the transverse module; shifts there are x_n cos beta):",
                          "", body])

    return show(args, pair, analysis, to_dict, render)


def _helical_keys(mesh, width: float, herringbone: bool, gap: float) -> dict:
    """The helical contract keys shared by external and internal pairs (mm, degrees)."""
    return {
        "helix_angle": math.degrees(mesh.helix_angle),
        "transverse_module": mesh.transverse_module,
        "transverse_pressure_angle": math.degrees(mesh.transverse_pressure_angle),
        "working_transverse_pressure_angle": math.degrees(mesh.working_transverse_pressure_angle),
        "base_helix_angle": math.degrees(mesh.base_helix_angle),
        "transverse_contact_ratio": mesh.transverse_contact_ratio,
        "overlap_ratio": mesh.overlap_ratio,
        "total_contact_ratio": mesh.total_contact_ratio,
        "axial_pitch": mesh.axial_pitch,
        "face_width": width,
        "herringbone": herringbone,
        "herringbone_gap": gap if herringbone else None,
    }


def _spur_dict(a) -> dict:
    from ._pairview import analysis_to_dict

    return analysis_to_dict(a)


def _spur_render():
    from ._pairview import render

    return render


def _zero_helix_keys(a) -> dict:
    p = a.pair
    out = {"helix_angle": 0.0, "transverse_module": p.module, "transverse_pressure_angle": math.degrees(p.pressure_angle),
           "overlap_ratio": 0.0, "total_contact_ratio": a.contact_ratio}
    return out


def helical_to_dict(a, info: dict) -> dict:
    """JSON of a helical pair: the spur keys in the normal section plus the helical contract keys (mm, degrees)."""
    from ._pairview import analysis_to_dict

    mesh = info["mesh"]
    p = a.pair
    scale = p.module / mesh.normal_module  # transverse over normal modules (1 / cos beta)
    data = analysis_to_dict(a)
    data.update({
        "module": mesh.normal_module,
        "pressure_angle": math.degrees(mesh.normal_pressure_angle),
        "centre_modification": p.centre_modification * scale,
        "normal_backlash": mesh.normal_backlash,
        **_helical_keys(mesh, info["face_width"], info["herringbone"], info["gap"]),
    })
    for entry, fig in zip(data["gears"], a.gears):
        g = fig.gear
        entry.update({
            "module": g.normal_module, "shift": g.normal_shift, "transverse_shift": g.shift,
            "tip_shortening": g.tip_shortening * scale, "min_shift": fig.min_shift * scale,
            "normal_tooth_thickness": g.normal_tooth_thickness,
            "lead": g.lead, "hand": g.hand, "base_helix_angle": math.degrees(g.base_helix_angle),
            "virtual_teeth": g.virtual_teeth,
        })
    return data


def render_helical(a, info: dict, rating=None) -> str:
    """The readable table of a helical pair (and its load rating, if any)."""
    from ._pairview import verdict_lines, mesh_rating_lines

    mesh = info["mesh"]
    p = a.pair
    g1, g2 = a.gears
    scale = p.module / mesh.normal_module
    kind = "Herringbone" if info["herringbone"] else "Helical"
    head = (f"{kind} pair {g1.gear.teeth} : {g2.gear.teeth}   normal module {mesh.normal_module:g} mm   "
            f"normal pressure angle {math.degrees(mesh.normal_pressure_angle):g} deg   "
            f"helix {math.degrees(mesh.helix_angle):g} deg   {p.gear1.system.title}")
    hands = (("right / left", "left / right") if info["herringbone"] and g1.gear.hand == "right"
             else ("left / right", "right / left") if info["herringbone"] else (g1.gear.hand, g2.gear.hand))
    rows = [
        ("teeth", str(g1.gear.teeth), str(g2.gear.teeth)),
        ("hand" + (" (lower half / upper half)" if info["herringbone"] else ""), *hands),
        ("normal profile shift x_n", f"{g1.gear.normal_shift:+.4f}", f"{g2.gear.normal_shift:+.4f}"),
        ("reference diameter", fmt(g1.gear.reference_diameter), fmt(g2.gear.reference_diameter)),
        ("base diameter", fmt(g1.gear.base_diameter), fmt(g2.gear.base_diameter)),
        ("working pitch diameter", fmt(g1.working_diameter), fmt(g2.working_diameter)),
        ("tip diameter", fmt(g1.gear.tip_diameter), fmt(g2.gear.tip_diameter)),
        ("root diameter", fmt(g1.gear.root_diameter), fmt(g2.gear.root_diameter)),
        ("form diameter (involute starts)", fmt(g1.form_diameter), fmt(g2.form_diameter)),
        ("lead", fmt(g1.gear.lead, 3), fmt(g2.gear.lead, 3)),
        ("normal tooth thickness at reference", fmt(g1.gear.normal_tooth_thickness), fmt(g2.gear.normal_tooth_thickness)),
        ("transverse tip thickness (arc)", fmt(g1.gear.tip_thickness), fmt(g2.gear.tip_thickness)),
        ("virtual tooth count z_n", f"{g1.gear.virtual_teeth:.3f}", f"{g2.gear.virtual_teeth:.3f}"),
        ("least normal shift without undercut", f"{g1.min_shift * scale:+.4f}", f"{g2.min_shift * scale:+.4f}"),
        ("undercut", "yes" if g1.undercut else "no", "yes" if g2.undercut else "no"),
    ]
    width = f"{info['face_width']:g} mm" + (f" (two halves, gap {info['gap']:g} mm)" if info["herringbone"] else "")
    mesh_rows = [
        ("transverse module", f"{fmt(mesh.transverse_module)} mm"),
        ("transverse pressure angle", f"{math.degrees(mesh.transverse_pressure_angle):.4f} deg"),
        ("base helix angle", f"{math.degrees(mesh.base_helix_angle):.4f} deg"),
        ("reference centre distance", f"{fmt(p.standard_centre_distance)} mm"),
        ("centre distance", f"{fmt(p.centre_distance)} mm"),
        ("centre-distance modification y (normal modules)", f"{p.centre_modification * scale:+.4f}"),
        ("working transverse pressure angle", f"{math.degrees(p.operating_pressure_angle):.4f} deg"),
        ("face width", width),
        ("transverse contact ratio", f"{mesh.transverse_contact_ratio:.4f}"),
        ("overlap ratio" + (" (one half)" if info["herringbone"] else ""), f"{mesh.overlap_ratio:.4f}"),
        ("total contact ratio", f"{mesh.total_contact_ratio:.4f}"),
        ("backlash, transverse circumferential / normal", f"{a.backlash:.4f} / {mesh.normal_backlash:.4f} mm"),
    ]
    findings = list(a.findings) + (list(rating.findings()) if rating else [])
    rating_lines = []
    if rating:
        rating_lines = mesh_rating_lines(rating)
        rating_lines.insert(-1, f"  helix factors: bending Y_beta {rating.bending_helix_factor:.3f}, contact Z_beta "
                                f"{rating.contact_helix_factor:.3f} (ISO 6336, from memory); Lewis Y of the virtual spur gear")
    return "\n".join([
        head, "",
        table(rows, header=("gear figures (mm)", "gear 1", "gear 2")), "",
        table(mesh_rows, header=("mesh", "")), "",
        *rating_lines,
        *verdict_lines(findings),
    ])
