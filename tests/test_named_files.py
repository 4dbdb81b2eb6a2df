"""No file named by an input is read without consent: a note of an SBML or cobra JSON file that
names a file outside that file's folder (``/etc/hostname``), a device (``/dev/zero``) or a pipe
(``/dev/stdin``) is refused with a message, and its content never reaches any output. Values
beside the network file still work, and a written network carries its note portably.
(Plumbing: no science here.)"""

from __future__ import annotations

import shutil

import pytest

import tfa
from tfa.cli import main
from tfa.errors import InputError, NetworkFileError
from tfa.network.io_sbml import load_network, write_cobra_json, write_sbml
from tfa.network.inputs import resolve_inputs

VALUES = ("id\tequation\tdelta_g_standard_kJ_per_mol\tsigma_kJ_per_mol\t"
          "delta_h_standard_kJ_per_mol\ttemperature_C\tph\tionic_strength\tpmg\tsource_key\t"
          "peer_reviewed\tnote\n"
          "v1\tac + atp <=> actp + adp\t13.0\t1.0\t\t25\t7\t0.25\t\tS1\tyes\tinvented test value\n")


@pytest.fixture()
def sbml_with_note(mini_folder, tmp_path):
    """Write the mini network as SBML in a folder of its own; return a function that sets the
    model-level note reaction_values_path in that file."""
    model = tfa.load_network(mini_folder)
    folder = tmp_path / "supplement"
    folder.mkdir()
    shutil.copy(mini_folder / "environment.toml", folder / "environment.toml")

    def make(note: str | None, name: str = "network.xml"):
        """The network written to ``name`` with the note set to ``note`` (as a hostile or
        careless author would write it: the text of the file is edited)."""
        model.notes = {k: v for k, v in model.notes.items() if k != "reaction_values_path"}
        placeholder = folder / "placeholder.tsv"
        placeholder.write_text(VALUES)
        if note is not None:
            model.notes["reaction_values_path"] = str(placeholder)
        path = folder / name
        (write_sbml if name.endswith(".xml") else write_cobra_json)(model, path)
        placeholder.unlink()
        if note is not None:
            text = path.read_text()
            assert "placeholder.tsv" in text
            path.write_text(text.replace("placeholder.tsv", note))
        return path

    return make


@pytest.mark.parametrize("note", ["/etc/hostname", "/dev/zero", "../outside.tsv", "/dev/stdin"])
@pytest.mark.parametrize("name", ["network.xml", "network.json"])
def test_a_note_naming_a_file_outside_the_folder_is_refused(sbml_with_note, tmp_path, capsys,
                                                            note, name):
    """A note reaction_values_path: /dev/zero made tfa read it (memory error); /dev/stdin hung."""
    (tmp_path / "outside.tsv").write_text(VALUES)
    path = sbml_with_note(note, name)
    with pytest.raises(NetworkFileError, match="outside its folder"):
        load_network(path)
    out = tmp_path / "results"
    code = main(["feasible", str(path), "--modes", "native", "--out", str(out), "--json"])
    captured = capsys.readouterr()
    assert code == 2 and "reaction_values_path" in captured.err and "outside" in captured.err
    assert captured.out == "" and not out.exists()
    hostname = open("/etc/hostname").read().strip()   # noqa: SIM115 - the file that must not leak
    assert hostname not in captured.err or hostname in str(path)


def test_a_note_inside_the_folder_is_followed_and_the_values_used(sbml_with_note):
    folder = sbml_with_note(None).parent
    (folder / "my_values.tsv").write_text(VALUES)
    path = sbml_with_note("my_values.tsv")
    inputs = resolve_inputs(path)
    assert inputs.literature_path == (folder / "my_values.tsv").resolve()
    assert inputs.model.notes["reaction_values_path"] == str(inputs.literature_path)


def test_a_note_that_names_a_folder_is_refused(sbml_with_note):
    folder = sbml_with_note(None).parent
    (folder / "values_dir").mkdir()
    path = sbml_with_note("values_dir")
    with pytest.raises(NetworkFileError, match="not a regular file"):
        load_network(path)


def test_writing_elsewhere_leaves_the_note_out(mini_folder, tmp_path):
    """A table network's values lie beside its table; SBML written to another folder does not
    point back there (it would be refused when read)."""
    (mini_folder / "reaction_values.tsv").write_text(VALUES)
    model = tfa.load_network(mini_folder)
    assert model.notes["reaction_values_path"]
    (tmp_path / "other").mkdir()
    path = write_sbml(model, tmp_path / "other" / "elsewhere.xml")
    assert "reaction_values_path" not in path.read_text()
    assert load_network(path).notes.get("reaction_values_path") is None


def test_the_note_of_a_model_made_in_python_passes_the_file_gate(mini_folder):
    """A cobra.Model handed over in Python is the caller's own (its note is followed), but never
    to a device."""
    model = tfa.load_network(mini_folder)
    model.notes["reaction_values_path"] = "/dev/zero"
    with pytest.raises(InputError, match="not a regular file"):
        resolve_inputs(model, mini_folder / "environment.toml")


def test_a_network_file_that_is_a_device_is_refused(tmp_path):
    link = tmp_path / "network.xml"
    link.symlink_to("/dev/zero")
    with pytest.raises(NetworkFileError, match="not a regular file"):
        load_network(link)
