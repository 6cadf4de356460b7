"""X2 attributes: TF, TA, TO, TD, attribute comments, escapes, .N with an empty value.

Source: Gerber Layer Format Specification rev. 2024.05 chapter 5 [Attributes]: §5.2 [File
attributes (TF)], §5.3 [Aperture attributes (TA)], §5.4 [Object attributes (TO)], §5.5
[Delete attribute (TD)], §5.6 [Standard attributes], §3.4.3 [Strings: escapes] (section
numbers recalled from memory; titles in brackets).
"""
from __future__ import annotations

from gerber_samples import parse, xy


def test_file_attributes_and_function():
    """§5.2: TF sets file attributes; .FileFunction fields are kept in order."""
    gf = parse("%TF.FileFunction,Copper,L1,Top*%\n%TF.Part,Single*%\n%TFMyOwn,a,b*%\n")
    assert gf.file_function == ("Copper", "L1", "Top")
    assert gf.file_attributes[".Part"] == ("Single",)
    assert gf.file_attributes["MyOwn"] == ("a", "b")
    assert gf.image_negative is False


def test_file_polarity_negative():
    """§5.6 [.FilePolarity]: Negative changes what the image means, not the image."""
    gf = parse("%TF.FilePolarity,Negative*%\n%ADD10C,1*%\nD10*\n" + xy(0, 0) + "D03*\n")
    assert gf.image_negative is True
    assert gf.objects[0].polarity == "dark"


def test_aperture_attributes_copied_at_ad_time():
    """§5.3: AD copies the aperture attributes in the dictionary at that moment; a later TA
    does not change apertures already defined."""
    gf = parse("%TA.AperFunction,SMDPad,CuDef*%\n%ADD10R,1X1*%\n%TA.AperFunction,ViaPad*%\n"
               "%ADD11C,0.6*%\nD10*\n" + xy(0, 0) + "D03*\nD11*\n" + xy(1, 0) + "D03*\n")
    assert gf.objects[0].attributes[".AperFunction"] == ("SMDPad", "CuDef")
    assert gf.objects[1].attributes[".AperFunction"] == ("ViaPad",)


def test_object_attributes_when_made_and_td():
    """§5.4 / §5.5: TO attaches to objects made afterwards; TD<name> removes one, TD removes
    all aperture and object attributes but never file attributes."""
    gf = parse("%TF.FileFunction,Copper,L2,Bot*%\n%ADD10C,1*%\nD10*\n"
               "%TO.N,GND*%\n%TO.P,U1,3,VIN*%\n%TO.C,U1*%\n" + xy(0, 0) + "D03*\n"
               "%TD.P*%\n" + xy(1, 0) + "D03*\n%TD*%\n" + xy(2, 0) + "D03*\n")
    a = [o.attributes for o in gf.objects]
    assert a[0] == {".N": ("GND",), ".P": ("U1", "3", "VIN"), ".C": ("U1",)}
    assert a[1] == {".N": ("GND",), ".C": ("U1",)}
    assert a[2] == {}
    assert gf.file_function == ("Copper", "L2", "Bot")


def test_attributes_in_comments():
    """§5.1 [Attributes overview]: 'G04 #@! TF...' comments carry attributes and are read
    like the real commands."""
    gf = parse("G04 #@! TF.FileFunction,Copper,L1,Top*\nG04 #@! TA.AperFunction,Conductor*\n"
               "%ADD10C,0.2*%\nG04 #@! TO.N,VBUS*\nD10*\nG01*\n" + xy(0, 0) + "D02*\n"
               + xy(3, 0) + "D01*\nG04 #@! TD.N*\nG04 plain comment, no attribute*\n"
               + xy(4, 0) + "D01*\n")
    assert gf.file_function == ("Copper", "L1", "Top")
    assert gf.objects[0].attributes == {".AperFunction": ("Conductor",), ".N": ("VBUS",)}
    assert gf.objects[1].attributes == {".AperFunction": ("Conductor",)}


def test_empty_net_name_means_no_net():
    """§5.6 [.N]: an empty value means the object belongs to no net; kept as ('',)."""
    gf = parse("%ADD10C,1*%\nD10*\n%TO.N,*%\n" + xy(0, 0) + "D03*\n%TO.N*%\n" + xy(1, 0)
               + "D03*\n")
    assert gf.objects[0].attributes[".N"] == ("",)
    assert gf.objects[1].attributes[".N"] == ("",)


def test_escapes_and_blanks():
    """§3.4.3: \\uXXXX escapes are decoded (\\u002C is a comma inside a field); stray blanks
    around names and fields are removed; UTF-8 text is kept."""
    gf = parse("%ADD10C,1*%\nD10*\n%TO.N , HV\\u002CBUS , Ω1 *%\n" + xy(0, 0) + "D03*\n")
    assert gf.objects[0].attributes[".N"] == ("HV,BUS", "Ω1")


def test_region_takes_attributes_from_dictionary():
    """§5.3: a region takes the aperture attributes in the dictionary at G36, not those of
    the current aperture."""
    gf = parse("%TA.AperFunction,ComponentPad*%\n%ADD10C,1*%\n%TD.AperFunction*%\n"
               "%TA.AperFunction,Conductor*%\n%TO.N,SW*%\nD10*\nG01*\nG36*\n"
               + xy(0, 0) + "D02*\n" + xy(1, 0) + "D01*\n" + xy(1, 1) + "D01*\n"
               + xy(0, 0) + "D01*\nG37*\n")
    assert gf.objects[0].attributes == {".AperFunction": ("Conductor",), ".N": ("SW",)}


def test_block_objects_keep_their_attributes():
    """§5.4 with §4.11: objects inside a block keep their own attributes; attributes in
    force at the block flash fill in names they lack (our reading; the spec leaves the
    merge to the reader)."""
    gf = parse("%ADD10C,1*%\n%ABD100*%\n%TO.P,J1,1*%\nD10*\n" + xy(0, 0) + "D03*\n%TD*%\n"
               "%AB*%\n%TO.N,NET1*%\nD100*\n" + xy(5, 0) + "D03*\n")
    assert gf.objects[0].attributes == {".P": ("J1", "1"), ".N": ("NET1",)}
