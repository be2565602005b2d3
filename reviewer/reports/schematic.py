"""Each stage drawn as a schematic (schemdraw, inline SVG) with its references and values.

The drawing shows the circuit the stage's numbers belong to: parts by their designator (Q1,
U1), the stage's own components by the key they are given under (``timing_r``, ``c``) with
their values as the report writes them. Links to other stages are labelled terminals ("pulse
from trigger"). schemdraw has no unijunction symbol: :class:`Ujt` draws one (a base bar with
the emitter's arrow slanting into it); the PUT is drawn as the anode-gate thyristor it is.
"""

from __future__ import annotations

import html
import math
import re
from typing import Any

from reviewer.fmt import show
from reviewer.model import Project, Stage, Value
from reviewer.textsafe import visible

try:  # an optional dependency at run time: a report without it says so
    import schemdraw
    import schemdraw.elements as elm
    from schemdraw.segments import Segment
except ImportError:  # pragma: no cover - schemdraw is a declared dependency
    schemdraw = None  # type: ignore[assignment]


def x(text: Any) -> str:
    """User text for a schemdraw label, which its SVG backend parses as markup: escaped."""
    return html.escape(visible(text), quote=False)


def val(v: Any) -> str:
    """A component value for a drawing: ``100 nF ±10%``, ``5.6 kΩ – 155.6 kΩ``, or the text
    (escaped for a label)."""
    if not isinstance(v, Value):
        return "" if v is None else x(v)
    if not v.varies:
        return show(v.nom, v.dim)
    if v.is_range or v.nom == 0:
        return f"{show(v.lo, v.dim)} – {show(v.hi, v.dim)}"
    up, down = (v.hi - v.nom) / v.nom * 100, (v.nom - v.lo) / v.nom * 100
    if math.isclose(up, down, rel_tol=1e-3, abs_tol=1e-6):
        return f"{show(v.nom, v.dim)} ±{up:.3g}%"
    return f"{show(v.nom, v.dim)} +{up:.3g}% −{down:.3g}%"


if schemdraw is not None:

    class Ujt(elm.Element):
        """A unijunction transistor: anchors ``e`` (emitter), ``b1`` and ``b2`` (bases)."""

        def __init__(self, **kwargs: Any) -> None:
            super().__init__(**kwargs)
            self.segments.append(Segment([(0, 0), (0, 0.35)]))
            self.segments.append(Segment([(0, 1.15), (0, 1.5)]))
            self.segments.append(Segment([(0, 0.35), (0, 1.15)], lw=3))
            self.segments.append(Segment([(-1.0, 0.45), (-0.55, 0.62)]))
            self.segments.append(Segment([(-0.55, 0.62), (0, 0.85)], arrow="->",
                                         arrowwidth=0.18, arrowlength=0.22))
            self.anchors["e"] = (-1.0, 0.45)
            self.anchors["b1"] = (0, 0)
            self.anchors["b2"] = (0, 1.5)
            self.params["drop"] = (0, 0)


def _param(stage: Stage, key: str) -> str:
    return f"{key} {val(stage.get(key))}".strip()


def _part(project: Project, ref: Any, what: str) -> str:
    part = project.parts.get(str(ref))
    return f"{x(ref)} {what}" if part is None else f"{x(ref)} ({part.type.upper()})"


def _source(d: Any, element: Any, text: str | list[str]) -> Any:
    """A source drawn upwards with its label to its left (clear of the circuit)."""
    d += element.up()
    lines = [text] if isinstance(text, str) else text
    d += elm.Label().at((element.center[0] - 0.7, element.center[1])).label(
        "\n".join(lines), halign="right", valign="center")
    return element


def _supply_label(project: Project) -> str:
    s = project.supply
    v = val(s.get("voltage"))
    if s.get("kind") == "ac":
        return f"line {v} RMS, {val(s.get('frequency'))}"
    return f"bus {v}"


def _oscillator(d: Any, stage: Stage, project: Project) -> None:
    if stage.get("sync") == "line":
        src = _source(d, elm.SourceSin(), [_supply_label(project), "rectified"])
        d += elm.Ground().at(src.start)
        d += elm.Line().at(src.end).right(1.2)
        top = d.here
        d += elm.Zener().down().reverse().label(_param(stage, "zener"), loc="bottom")
        d += elm.Ground()
        d.move_from(top, 0, 0)
    else:
        src = _source(d, elm.SourceV(), _param(stage, "supply"))
        d += elm.Ground().at(src.start)
        d.move_from(src.end, 0, 0)
    d += elm.Line().right(3.6 if stage.get("sync") == "line" else 2.6)  # room for labels
    node = d.here
    d += elm.Line().right(5.0)
    if stage.kind == "ujt-oscillator":
        d += elm.Resistor().down().label(_param(stage, "base2_r"), loc="bottom")
        u = Ujt().theta(0).anchor("b2").label(_part(project, stage.get("ujt"), "UJT"), loc="right",
                                     ofst=(0.3, 0.4))
        d += u
        d += elm.Resistor().at(u.b1).down().label(_param(stage, "base1_r"), loc="bottom")
        d += elm.Ground()
        d += elm.Line().at(u.b1).right(2.0)
        d += elm.Dot(open=True).label("pulse out", loc="right")
        fire = u.e
    else:
        d += elm.Resistor().down().label(_param(stage, "gate_r_upper"), loc="bottom")
        g = d.here
        d += elm.Resistor().down().label(_param(stage, "gate_r_lower"), loc="bottom")
        d += elm.Ground()
        d += elm.Line().at(g).left(2.0)
        q = elm.SCR().up().flip().anchor("gate")
        d += q
        d += elm.Label().at((q.end[0] + 0.2, q.end[1] + 0.45)).label(
            _part(project, stage.get("put"), "PUT"), halign="left")
        fire = q.end
        d += elm.Line().at(q.start).down(0.5)
        k = d.here
        d += elm.Resistor().down().label(_param(stage, "cathode_r"), loc="bottom")
        d += elm.Ground()
        d += elm.Line().at(k).left(1.0)
        d += elm.Dot(open=True).label("pulse out", loc="bottom")
    d += elm.Resistor().at(node).down().toy(fire).label(_param(stage, "timing_r"),
                                                        loc="bottom")
    e_node = d.here
    d += elm.Line().to(fire)
    d += elm.Capacitor().at(e_node).down().label(_param(stage, "timing_c"), loc="bottom")
    d += elm.Ground()


def _gate(d: Any, stage: Stage, project: Project) -> None:
    d += elm.Dot(open=True).label(f"pulse from {x(stage.get('source'))}", loc="left")
    if stage.get("coupling") == "transformer":
        d += elm.Line().right(0.8)
        t = elm.Transformer(t1=4, t2=4).anchor("p1").label(
            f"turns ratio {val(stage.get('turns_ratio'))}", loc="bottom", ofst=0.4)
        d += t
        d += elm.Line().at(t.p2).down(0.4)
        d += elm.Ground()
        d += elm.Line().at(t.s1).right(0.8)
    else:
        d += elm.Line().right(1.0)
    d += elm.Resistor().right().label(_param(stage, "series_r"))
    gate_node = d.here
    d += elm.Line().right(1.5)
    scrs = stage.get("scr")
    ref = scrs[0] if isinstance(scrs, list) and scrs else scrs
    q = elm.SCR().up().anchor("gate").label(_part(project, ref, "SCR"), loc="bottom", ofst=0.4)
    d += q
    d += elm.Line().at(q.end).up(0.8)
    d += elm.Dot(open=True).label("anode, to the load", loc="right")
    d += elm.Line().at(q.start).down(0.6)
    cathode = d.here
    d += elm.Ground()
    if stage.get("gate_cathode_r") is not None:
        d += elm.Line().at(gate_node).down(0.01)
        d += elm.Resistor().at(gate_node).down().toy(cathode).label(
            _param(stage, "gate_cathode_r"), loc="bottom")
        d += elm.Line().to(cathode)


def _load(d: Any, stage: Stage, direction: str = "down") -> None:
    load = stage.get("load") or {}
    r = elm.Resistor().label(f"load.r {val(load.get('r'))}", loc="bottom")
    d += getattr(r, direction)()
    if load.get("l") is not None:
        ind = elm.Inductor().label(f"load.l {val(load.get('l'))}", loc="bottom")
        d += getattr(ind, direction)()
    if load.get("e") is not None:
        e = elm.Battery().label(f"load.e {val(load.get('e'))}", loc="bottom")
        d += getattr(e, direction)()


def _bridge(d: Any, stage: Stage, project: Project) -> None:
    """A fully controlled single-phase bridge: two legs of two SCRs, the line between their
    midpoints, the load between the legs' common cathodes (top) and anodes (bottom)."""
    ref = x(stage.get("scr"))
    gate = f"gates from {x(stage.get('gate'))}" if stage.get("gate") else "gates"
    low = elm.SCR().up().label(f"{ref}", loc="bottom", ofst=0.2)
    d += low
    left = d.here
    d += elm.SCR().up().label(f"{ref}", loc="bottom", ofst=0.2)
    top_left = d.here
    fuse = stage.get("fuse")
    d += elm.Line().at(left).right(0.6)
    if isinstance(fuse, dict):
        d += elm.Fuse().right().label(f"fuse {val(fuse.get('rating'))}")
    d += elm.SourceSin().right()
    d += elm.Line().right(0.6)
    right = d.here
    d += elm.SCR().up().label(f"{ref}", loc="bottom", ofst=0.2)
    top_right = d.here
    d += elm.SCR().at((right[0], low.start[1])).up().toy(right).label(f"{ref}", loc="bottom",
                                                                       ofst=0.2)
    d += elm.Line().at(top_left).to(top_right)
    d += elm.Line().right(2.4)
    start = d.here
    _load(d, stage)
    d += elm.Line().toy(low.start)
    bottom = d.here
    if stage.get("freewheel"):
        d += elm.Line().at(start).right(2.2)
        d += elm.Diode().down().reverse().toy(bottom).label("freewheeling diode", loc="bottom")
        d += elm.Line().to(bottom)
    d += elm.Line().at(bottom).to(low.start)
    d += elm.Label().at((low.start[0], low.start[1] - 0.9)).label(
        f"source: {_supply_label(project)}\n{ref}: four SCRs, {gate}", halign="left")


def _power(d: Any, stage: Stage, project: Project) -> None:
    if stage.get("topology") == "bridge":
        _bridge(d, stage, project)
        return
    ac = stage.kind == "phase-control"
    src = _source(d, elm.SourceSin() if ac else elm.SourceV(), _supply_label(project))
    fuse = stage.get("fuse")
    d += elm.Line().at(src.end).up(0.5)
    if isinstance(fuse, dict):
        d += elm.Fuse().right().label(f"fuse {val(fuse.get('rating'))}")
    else:
        d += elm.Line().right(2)
    d += elm.Line().right(3.5)
    a = d.here
    topology = stage.get("topology", "")
    ref = stage.get("scr")
    name = _part(project, ref, "SCR")
    gate = f"gate from {x(stage.get('gate'))}" if stage.get("gate") else "gate"
    if topology == "ac-switch":
        q1 = elm.SCR().down()
        d += q1
        d += elm.Line().at(q1.gate).left(0.8)
        d += elm.Dot(open=True).label(gate, loc="left")
        d += elm.Line().at(a).right(1.6)
        q2 = elm.SCR().down().reverse().label(f"{name} ×2, antiparallel", loc="bottom",
                                              ofst=0.3)
        d += q2
        d += elm.Line().at(q2.end).to(q1.end)
        d.move_from(q1.end, 0, 0)
    else:
        q = elm.SCR().down().label(name, loc="bottom", ofst=0.2)
        d += q
        d += elm.Line().at(q.gate).left(0.8)
        d += elm.Dot(open=True).label(gate, loc="left")
        d.move_from(q.end, 0, 0)
    start = d.here
    _load(d, stage)
    bottom = d.here
    if stage.get("freewheel"):
        d += elm.Line().at(start).right(2.2)
        d += elm.Diode().down().reverse().toy(bottom).label("freewheeling diode", loc="bottom")
        d += elm.Line().to(bottom)
    d += elm.Line().to((src.start[0], bottom[1]))
    d += elm.Line().to(src.start)
    d += elm.Ground().at(src.start)


def _triac_power(d: Any, stage: Stage, project: Project) -> None:
    """One triac in series with the load across the line, its gate from the drive stage."""
    src = _source(d, elm.SourceSin(), _supply_label(project))
    fuse = stage.get("fuse")
    d += elm.Line().at(src.end).up(0.5)
    if isinstance(fuse, dict):
        d += elm.Fuse().right().label(f"fuse {val(fuse.get('rating'))}")
    else:
        d += elm.Line().right(2)
    d += elm.Line().right(3.5)
    q = elm.Triac().down().label(_part(project, stage.get("triac"), "triac"), loc="bottom",
                                 ofst=0.2)
    d += q
    gate = f"gate from {x(stage.get('gate'))}" if stage.get("gate") else "gate"
    d += elm.Line().at(q.gate).left(0.8)
    d += elm.Dot(open=True).label(gate, loc="left")
    d.move_from(q.end, 0, 0)
    _load(d, stage)
    bottom = d.here
    d += elm.Line().to((src.start[0], bottom[1]))
    d += elm.Line().to(src.start)
    d += elm.Ground().at(src.start)


def _triac_gate(d: Any, stage: Stage, project: Project) -> None:
    """The drive source through R_S (and the driver's drop) into the triac's gate, MT1 common."""
    mode = str(stage.get("mode", ""))
    src = _source(d, elm.SourceSin() if mode == "ac" else
                  elm.SourceV().reverse() if mode == "negative-dc" else elm.SourceV(),
                  [f"drive {val(stage.get('drive'))}", f"mode: {x(mode)}"])
    d += elm.Ground().at(src.start)
    d.move_from(src.end, 0, 0)
    d += elm.Resistor().right().label(_param(stage, "series_r"))
    if stage.get("drive_drop") is not None:
        d += elm.Diode().right().label(_param(stage, "drive_drop"))
    d += elm.Line().right(1.2)
    gate_node = d.here
    q = elm.Triac().up().anchor("gate").label(_part(project, stage.get("triac"), "triac"),
                                              loc="bottom", ofst=0.4)
    d += q
    d += elm.Line().at(q.end).up(0.8)
    d += elm.Dot(open=True).label("MT2, to the load", loc="right")
    d += elm.Line().at(q.start).down(0.6)
    mt1 = d.here
    d += elm.Ground()
    if stage.get("gate_cathode_r") is not None:
        d += elm.Resistor().at(gate_node).down().toy(mt1).label(
            _param(stage, "gate_cathode_r"), loc="bottom")
        d += elm.Line().to(mt1)


def _snubber(d: Any, stage: Stage, project: Project) -> None:
    power = project.stages.get(str(stage.get("across", "")))
    is_triac = power is not None and power.kind == "triac-phase-control"
    ref = (power.get("triac") if is_triac else power.get("scr")) if power is not None else "SCR"
    step = stage.get("step", "line")
    step_text = f"step {val(step)}" if isinstance(step, Value) else f"step: {step}"
    src = _source(d, elm.SourceSquare(), step_text)
    ind = stage.get("inductance")
    d += elm.Inductor().at(src.end).right().label(
        f"inductance {val(ind)}" if ind is not None else
        f"supply.inductance {val(project.supply.get('inductance'))}")
    d += elm.Line().right(1)
    a = d.here
    d += elm.Line().right(3.0)
    d += elm.Resistor().down().label(_param(stage, "r"), loc="bottom")
    d += elm.Capacitor().down().label(_param(stage, "c"), loc="bottom")
    bottom = d.here
    device = elm.Triac() if is_triac else elm.SCR()
    d += device.at(a).down().label(_part(project, ref, "triac" if is_triac else "SCR")
                                   + ", off", loc="top", ofst=0.2)
    d += elm.Line().toy(bottom)
    d += elm.Line().to(bottom)
    d += elm.Line().at(src.start).toy(bottom)
    d += elm.Line().tox(bottom)
    d += elm.Ground().at(src.start)


def _commutation(d: Any, stage: Stage, project: Project) -> None:
    target = project.stages.get(str(stage.get("for", "")))
    ref = target.get("scr") if target is not None else "SCR"
    src = _source(d, elm.SourceV(), _supply_label(project))
    d += elm.Line().at(src.end).right(1)
    if target is not None:
        _load(d, target, "right")
    d += elm.Line().right(1)
    a = d.here
    with_diode = stage.kind == "resonant-commutation" and stage.get("diode") is not False
    d += elm.Line().right(6.0 if with_diode else 2.6)
    d += elm.Switch().down().label("auxiliary switch", loc="bottom")
    if stage.kind == "resonant-commutation":
        d += elm.Inductor().down().label(_param(stage, "l"), loc="bottom")
    cv = stage.get("charge_voltage")
    d += elm.Capacitor().down().label([_param(stage, "c"),
                                       f"charged to {val(cv)}" if cv is not None
                                       else "charged to the supply"], loc="bottom")
    bottom = d.here
    d += elm.SCR().at(a).down().label(_part(project, ref, "SCR"), loc="top", ofst=0.2)
    d += elm.Line().toy(bottom)
    d += elm.Line().to(bottom)
    d += elm.Line().at(src.start).toy(bottom)
    d += elm.Line().tox(bottom)
    d += elm.Ground().at(src.start)
    if with_diode:
        d += elm.Line().at(a).right(1.3)
        d += elm.Diode().down().reverse().label(
            "diode" if stage.get("diode") else ["diode", "(both forms computed)"],
            loc="bottom")
        d += elm.Line().toy(bottom)


def _line_commutation(d: Any, stage: Stage, project: Project) -> None:
    target = project.stages.get(str(stage.get("for", "")))
    if target is None:
        raise ValueError("its power stage is not in the project")
    _power(d, target, project)


def _diac_rc(d: Any, stage: Stage, project: Project) -> None:
    """The line through the load to MT2; the RC network (pot + series R, C, optionally R2–C2)
    across the triac; the diac from the network's capacitor through the gate resistor."""
    src = _source(d, elm.SourceSin(), _supply_label(project))
    d += elm.Ground().at(src.start)
    d += elm.Line().at(src.end).up(0.5)
    d += elm.Resistor().right().label("load")
    mt2 = d.here
    d += elm.Dot()
    label = f"pot {val(stage.get('pot'))}"
    d += elm.Potentiometer().right().label(label)
    if stage.get("series_r") is not None:
        d += elm.Resistor().right().label(_param(stage, "series_r"))
    node = d.here
    d += elm.Dot()
    d += elm.Capacitor().down().label(_param(stage, "c"), loc="bottom")
    d += elm.Ground()
    if stage.get("r2") is not None:
        d.move_from(node, 0, 0)
        d += elm.Line().right(1.6)  # room for the capacitors' labels
        d += elm.Resistor().right().label(_param(stage, "r2"))
        node = d.here
        d += elm.Dot()
        d += elm.Capacitor().down().label(_param(stage, "c2"), loc="bottom")
        d += elm.Ground()
    d.move_from(node, 0, 0)
    d += elm.Line().right(1.6)
    d += elm.Diac().right().label(_part(project, stage.get("diac"), "diac"))
    if stage.get("gate_r") is not None:
        d += elm.Resistor().right().label(_param(stage, "gate_r"))
    d += elm.Line().right(0.6)
    q = elm.Triac().up().anchor("gate").label(_part(project, stage.get("triac"), "triac"),
                                              loc="bottom", ofst=0.4)
    d += q
    d += elm.Ground().at(q.start)
    top = (q.end[0], mt2[1] + 1.2)
    d += elm.Line().at(q.end).toy(top[1])
    d += elm.Line().tox(mt2[0])
    d += elm.Line().toy(mt2[1])


DRAW = {"ujt-oscillator": _oscillator, "put-oscillator": _oscillator, "gate-drive": _gate,
        "phase-control": _power, "dc-switch": _power, "rc-snubber": _snubber,
        "capacitor-commutation": _commutation, "resonant-commutation": _commutation,
        "line-commutation": _line_commutation, "triac-phase-control": _triac_power,
        "triac-gate": _triac_gate, "diac-rc": _diac_rc}


def stage_svg(stage: Stage, project: Project) -> tuple[str, str]:
    """(inline SVG of the stage's schematic, "") or ("", the reason there is none)."""
    if schemdraw is None:
        return "", "no schematic: schemdraw is not installed"
    fn = DRAW.get(stage.kind)
    if fn is None:
        return "", f"no schematic for a {stage.kind} stage"
    try:
        with schemdraw.Drawing(canvas="svg", show=False) as d:
            d.config(fontsize=11, unit=2.2, margin=0.6)
            fn(d, stage, project)
        svg = d.get_imagedata("svg").decode("utf-8")
    except (ValueError, KeyError, TypeError, AttributeError, SyntaxError) as exc:
        # SyntaxError: xml.etree's ParseError, should a label still not parse as markup.
        return "", f"no schematic: it could not be drawn ({exc})"
    svg = svg[svg.index("<svg"):]
    svg = re.sub(r'\s+xmlns(?::\w+)?="[^"]*"', "", svg, count=3)
    return svg, ""
