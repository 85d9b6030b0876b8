"""Unit names and their meaning, as pint's default registry gives them (generated:
do not edit; regenerate with ``python tools/make_unit_table.py``).

``UNITS[name] = (factor, dims)``: the unit's size in coherent SI units (the float that
pint's registry gives, radian = 1) and its dimension as (pint base dimension, exponent),
an exponent an int or a fraction's text. The comment names pint's unit.
"""

PINT_VERSION = '0.25.3'

UNITS: dict[str, tuple[float, tuple[tuple[str, int | str], ...]]] = {
    'm': (1.0, (('[length]', 1),)),  # meter
    'meter': (1.0, (('[length]', 1),)),  # meter
    'metre': (1.0, (('[length]', 1),)),  # meter
    'Ym': (1e+24, (('[length]', 1),)),  # yottameter
    'yottameter': (1e+24, (('[length]', 1),)),  # yottameter
    'yottametre': (1e+24, (('[length]', 1),)),  # yottameter
    'Zm': (1e+21, (('[length]', 1),)),  # zettameter
    'zettameter': (1e+21, (('[length]', 1),)),  # zettameter
    'zettametre': (1e+21, (('[length]', 1),)),  # zettameter
    'Em': (1e+18, (('[length]', 1),)),  # exameter
    'exameter': (1e+18, (('[length]', 1),)),  # exameter
    'exametre': (1e+18, (('[length]', 1),)),  # exameter
    'Pm': (1000000000000000.0, (('[length]', 1),)),  # petameter
    'petameter': (1000000000000000.0, (('[length]', 1),)),  # petameter
    'petametre': (1000000000000000.0, (('[length]', 1),)),  # petameter
    'Tm': (1000000000000.0, (('[length]', 1),)),  # terameter
    'terameter': (1000000000000.0, (('[length]', 1),)),  # terameter
    'terametre': (1000000000000.0, (('[length]', 1),)),  # terameter
    'Gm': (1000000000.0, (('[length]', 1),)),  # gigameter
    'gigameter': (1000000000.0, (('[length]', 1),)),  # gigameter
    'gigametre': (1000000000.0, (('[length]', 1),)),  # gigameter
    'Mm': (1000000.0, (('[length]', 1),)),  # megameter
    'megameter': (1000000.0, (('[length]', 1),)),  # megameter
    'megametre': (1000000.0, (('[length]', 1),)),  # megameter
    'km': (1000.0, (('[length]', 1),)),  # kilometer
    'kilometer': (1000.0, (('[length]', 1),)),  # kilometer
    'kilometre': (1000.0, (('[length]', 1),)),  # kilometer
    'hm': (100.0, (('[length]', 1),)),  # hectometer
    'hectometer': (100.0, (('[length]', 1),)),  # hectometer
    'hectometre': (100.0, (('[length]', 1),)),  # hectometer
    'dam': (10.0, (('[length]', 1),)),  # decameter
    'decameter': (10.0, (('[length]', 1),)),  # decameter
    'decametre': (10.0, (('[length]', 1),)),  # decameter
    'dm': (0.1, (('[length]', 1),)),  # decimeter
    'decimeter': (0.1, (('[length]', 1),)),  # decimeter
    'decimetre': (0.1, (('[length]', 1),)),  # decimeter
    'cm': (0.01, (('[length]', 1),)),  # centimeter
    'centimeter': (0.01, (('[length]', 1),)),  # centimeter
    'centimetre': (0.01, (('[length]', 1),)),  # centimeter
    'mm': (0.001, (('[length]', 1),)),  # millimeter
    'millimeter': (0.001, (('[length]', 1),)),  # millimeter
    'millimetre': (0.001, (('[length]', 1),)),  # millimeter
    'um': (1e-06, (('[length]', 1),)),  # micrometer
    'micrometer': (1e-06, (('[length]', 1),)),  # micrometer
    'micrometre': (1e-06, (('[length]', 1),)),  # micrometer
    'nm': (1e-09, (('[length]', 1),)),  # nanometer
    'nanometer': (1e-09, (('[length]', 1),)),  # nanometer
    'nanometre': (1e-09, (('[length]', 1),)),  # nanometer
    'pm': (1e-12, (('[length]', 1),)),  # picometer
    'picometer': (1e-12, (('[length]', 1),)),  # picometer
    'picometre': (1e-12, (('[length]', 1),)),  # picometer
    'femtometer': (1e-15, (('[length]', 1),)),  # femtometer
    'femtometre': (1e-15, (('[length]', 1),)),  # femtometer
    'am': (1e-18, (('[length]', 1),)),  # attometer
    'attometer': (1e-18, (('[length]', 1),)),  # attometer
    'attometre': (1e-18, (('[length]', 1),)),  # attometer
    'zm': (1e-21, (('[length]', 1),)),  # zeptometer
    'zeptometer': (1e-21, (('[length]', 1),)),  # zeptometer
    'zeptometre': (1e-21, (('[length]', 1),)),  # zeptometer
    'ym': (1e-24, (('[length]', 1),)),  # yoctometer
    'yoctometer': (1e-24, (('[length]', 1),)),  # yoctometer
    'yoctometre': (1e-24, (('[length]', 1),)),  # yoctometer
    'g': (0.001, (('[mass]', 1),)),  # gram
    'gram': (0.001, (('[mass]', 1),)),  # gram
    'Yg': (1e+21, (('[mass]', 1),)),  # yottagram
    'yottagram': (1e+21, (('[mass]', 1),)),  # yottagram
    'Zg': (1e+18, (('[mass]', 1),)),  # zettagram
    'zettagram': (1e+18, (('[mass]', 1),)),  # zettagram
    'Eg': (1000000000000000.0, (('[mass]', 1),)),  # exagram
    'exagram': (1000000000000000.0, (('[mass]', 1),)),  # exagram
    'Pg': (1000000000000.0, (('[mass]', 1),)),  # petagram
    'petagram': (1000000000000.0, (('[mass]', 1),)),  # petagram
    'Tg': (1000000000.0, (('[mass]', 1),)),  # teragram
    'teragram': (1000000000.0, (('[mass]', 1),)),  # teragram
    'Gg': (1000000.0, (('[mass]', 1),)),  # gigagram
    'gigagram': (1000000.0, (('[mass]', 1),)),  # gigagram
    'Mg': (1000.0, (('[mass]', 1),)),  # megagram
    'megagram': (1000.0, (('[mass]', 1),)),  # megagram
    'kg': (1.0, (('[mass]', 1),)),  # kilogram
    'kilogram': (1.0, (('[mass]', 1),)),  # kilogram
    'hg': (0.1, (('[mass]', 1),)),  # hectogram
    'hectogram': (0.1, (('[mass]', 1),)),  # hectogram
    'dag': (0.01, (('[mass]', 1),)),  # decagram
    'decagram': (0.01, (('[mass]', 1),)),  # decagram
    'dg': (0.0001, (('[mass]', 1),)),  # decigram
    'decigram': (0.0001, (('[mass]', 1),)),  # decigram
    'cg': (1e-05, (('[mass]', 1),)),  # centigram
    'centigram': (1e-05, (('[mass]', 1),)),  # centigram
    'mg': (1e-06, (('[mass]', 1),)),  # milligram
    'milligram': (1e-06, (('[mass]', 1),)),  # milligram
    'ug': (1e-09, (('[mass]', 1),)),  # microgram
    'microgram': (1e-09, (('[mass]', 1),)),  # microgram
    'ng': (1.0000000000000002e-12, (('[mass]', 1),)),  # nanogram
    'nanogram': (1.0000000000000002e-12, (('[mass]', 1),)),  # nanogram
    'pg': (1e-15, (('[mass]', 1),)),  # picogram
    'picogram': (1e-15, (('[mass]', 1),)),  # picogram
    'fg': (1e-18, (('[mass]', 1),)),  # femtogram
    'femtogram': (1e-18, (('[mass]', 1),)),  # femtogram
    'ag': (1.0000000000000001e-21, (('[mass]', 1),)),  # attogram
    'attogram': (1.0000000000000001e-21, (('[mass]', 1),)),  # attogram
    'zg': (1e-24, (('[mass]', 1),)),  # zeptogram
    'zeptogram': (1e-24, (('[mass]', 1),)),  # zeptogram
    'yg': (9.999999999999999e-28, (('[mass]', 1),)),  # yoctogram
    'yoctogram': (9.999999999999999e-28, (('[mass]', 1),)),  # yoctogram
    's': (1.0, (('[time]', 1),)),  # second
    'second': (1.0, (('[time]', 1),)),  # second
    'Ys': (1e+24, (('[time]', 1),)),  # yottasecond
    'yottasecond': (1e+24, (('[time]', 1),)),  # yottasecond
    'Zs': (1e+21, (('[time]', 1),)),  # zettasecond
    'zettasecond': (1e+21, (('[time]', 1),)),  # zettasecond
    'Es': (1e+18, (('[time]', 1),)),  # exasecond
    'exasecond': (1e+18, (('[time]', 1),)),  # exasecond
    'Ps': (1000000000000000.0, (('[time]', 1),)),  # petasecond
    'petasecond': (1000000000000000.0, (('[time]', 1),)),  # petasecond
    'Ts': (1000000000000.0, (('[time]', 1),)),  # terasecond
    'terasecond': (1000000000000.0, (('[time]', 1),)),  # terasecond
    'Gs': (1000000000.0, (('[time]', 1),)),  # gigasecond
    'gigasecond': (1000000000.0, (('[time]', 1),)),  # gigasecond
    'Ms': (1000000.0, (('[time]', 1),)),  # megasecond
    'megasecond': (1000000.0, (('[time]', 1),)),  # megasecond
    'ks': (1000.0, (('[time]', 1),)),  # kilosecond
    'kilosecond': (1000.0, (('[time]', 1),)),  # kilosecond
    'hs': (100.0, (('[time]', 1),)),  # hectosecond
    'hectosecond': (100.0, (('[time]', 1),)),  # hectosecond
    'das': (10.0, (('[time]', 1),)),  # decasecond
    'decasecond': (10.0, (('[time]', 1),)),  # decasecond
    'ds': (0.1, (('[time]', 1),)),  # decisecond
    'decisecond': (0.1, (('[time]', 1),)),  # decisecond
    'cs': (0.01, (('[time]', 1),)),  # centisecond
    'centisecond': (0.01, (('[time]', 1),)),  # centisecond
    'ms': (0.001, (('[time]', 1),)),  # millisecond
    'millisecond': (0.001, (('[time]', 1),)),  # millisecond
    'us': (1e-06, (('[time]', 1),)),  # microsecond
    'microsecond': (1e-06, (('[time]', 1),)),  # microsecond
    'ns': (1e-09, (('[time]', 1),)),  # nanosecond
    'nanosecond': (1e-09, (('[time]', 1),)),  # nanosecond
    'ps': (1e-12, (('[time]', 1),)),  # picosecond
    'picosecond': (1e-12, (('[time]', 1),)),  # picosecond
    'fs': (1e-15, (('[time]', 1),)),  # femtosecond
    'femtosecond': (1e-15, (('[time]', 1),)),  # femtosecond
    'as': (1e-18, (('[time]', 1),)),  # attosecond
    'attosecond': (1e-18, (('[time]', 1),)),  # attosecond
    'zs': (1e-21, (('[time]', 1),)),  # zeptosecond
    'zeptosecond': (1e-21, (('[time]', 1),)),  # zeptosecond
    'ys': (1e-24, (('[time]', 1),)),  # yoctosecond
    'yoctosecond': (1e-24, (('[time]', 1),)),  # yoctosecond
    'A': (1.0, (('[current]', 1),)),  # ampere
    'ampere': (1.0, (('[current]', 1),)),  # ampere
    'YA': (1e+24, (('[current]', 1),)),  # yottaampere
    'yottaampere': (1e+24, (('[current]', 1),)),  # yottaampere
    'ZA': (1e+21, (('[current]', 1),)),  # zettaampere
    'zettaampere': (1e+21, (('[current]', 1),)),  # zettaampere
    'EA': (1e+18, (('[current]', 1),)),  # exaampere
    'exaampere': (1e+18, (('[current]', 1),)),  # exaampere
    'PA': (1000000000000000.0, (('[current]', 1),)),  # petaampere
    'petaampere': (1000000000000000.0, (('[current]', 1),)),  # petaampere
    'TA': (1000000000000.0, (('[current]', 1),)),  # teraampere
    'teraampere': (1000000000000.0, (('[current]', 1),)),  # teraampere
    'GA': (1000000000.0, (('[current]', 1),)),  # gigaampere
    'gigaampere': (1000000000.0, (('[current]', 1),)),  # gigaampere
    'MA': (1000000.0, (('[current]', 1),)),  # megaampere
    'megaampere': (1000000.0, (('[current]', 1),)),  # megaampere
    'kA': (1000.0, (('[current]', 1),)),  # kiloampere
    'kiloampere': (1000.0, (('[current]', 1),)),  # kiloampere
    'hA': (100.0, (('[current]', 1),)),  # hectoampere
    'hectoampere': (100.0, (('[current]', 1),)),  # hectoampere
    'daA': (10.0, (('[current]', 1),)),  # decaampere
    'decaampere': (10.0, (('[current]', 1),)),  # decaampere
    'dA': (0.1, (('[current]', 1),)),  # deciampere
    'deciampere': (0.1, (('[current]', 1),)),  # deciampere
    'cA': (0.01, (('[current]', 1),)),  # centiampere
    'centiampere': (0.01, (('[current]', 1),)),  # centiampere
    'mA': (0.001, (('[current]', 1),)),  # milliampere
    'milliampere': (0.001, (('[current]', 1),)),  # milliampere
    'uA': (1e-06, (('[current]', 1),)),  # microampere
    'microampere': (1e-06, (('[current]', 1),)),  # microampere
    'nA': (1e-09, (('[current]', 1),)),  # nanoampere
    'nanoampere': (1e-09, (('[current]', 1),)),  # nanoampere
    'pA': (1e-12, (('[current]', 1),)),  # picoampere
    'picoampere': (1e-12, (('[current]', 1),)),  # picoampere
    'fA': (1e-15, (('[current]', 1),)),  # femtoampere
    'femtoampere': (1e-15, (('[current]', 1),)),  # femtoampere
    'aA': (1e-18, (('[current]', 1),)),  # attoampere
    'attoampere': (1e-18, (('[current]', 1),)),  # attoampere
    'zA': (1e-21, (('[current]', 1),)),  # zeptoampere
    'zeptoampere': (1e-21, (('[current]', 1),)),  # zeptoampere
    'yA': (1e-24, (('[current]', 1),)),  # yoctoampere
    'yoctoampere': (1e-24, (('[current]', 1),)),  # yoctoampere
    'K': (1.0, (('[temperature]', 1),)),  # kelvin
    'kelvin': (1.0, (('[temperature]', 1),)),  # kelvin
    'YK': (1e+24, (('[temperature]', 1),)),  # yottakelvin
    'yottakelvin': (1e+24, (('[temperature]', 1),)),  # yottakelvin
    'ZK': (1e+21, (('[temperature]', 1),)),  # zettakelvin
    'zettakelvin': (1e+21, (('[temperature]', 1),)),  # zettakelvin
    'EK': (1e+18, (('[temperature]', 1),)),  # exakelvin
    'exakelvin': (1e+18, (('[temperature]', 1),)),  # exakelvin
    'PK': (1000000000000000.0, (('[temperature]', 1),)),  # petakelvin
    'petakelvin': (1000000000000000.0, (('[temperature]', 1),)),  # petakelvin
    'TK': (1000000000000.0, (('[temperature]', 1),)),  # terakelvin
    'terakelvin': (1000000000000.0, (('[temperature]', 1),)),  # terakelvin
    'GK': (1000000000.0, (('[temperature]', 1),)),  # gigakelvin
    'gigakelvin': (1000000000.0, (('[temperature]', 1),)),  # gigakelvin
    'MK': (1000000.0, (('[temperature]', 1),)),  # megakelvin
    'megakelvin': (1000000.0, (('[temperature]', 1),)),  # megakelvin
    'kK': (1000.0, (('[temperature]', 1),)),  # kilokelvin
    'kilokelvin': (1000.0, (('[temperature]', 1),)),  # kilokelvin
    'hK': (100.0, (('[temperature]', 1),)),  # hectokelvin
    'hectokelvin': (100.0, (('[temperature]', 1),)),  # hectokelvin
    'daK': (10.0, (('[temperature]', 1),)),  # decakelvin
    'decakelvin': (10.0, (('[temperature]', 1),)),  # decakelvin
    'dK': (0.1, (('[temperature]', 1),)),  # decikelvin
    'decikelvin': (0.1, (('[temperature]', 1),)),  # decikelvin
    'cK': (0.01, (('[temperature]', 1),)),  # centikelvin
    'centikelvin': (0.01, (('[temperature]', 1),)),  # centikelvin
    'mK': (0.001, (('[temperature]', 1),)),  # millikelvin
    'millikelvin': (0.001, (('[temperature]', 1),)),  # millikelvin
    'uK': (1e-06, (('[temperature]', 1),)),  # microkelvin
    'microkelvin': (1e-06, (('[temperature]', 1),)),  # microkelvin
    'nK': (1e-09, (('[temperature]', 1),)),  # nanokelvin
    'nanokelvin': (1e-09, (('[temperature]', 1),)),  # nanokelvin
    'pK': (1e-12, (('[temperature]', 1),)),  # picokelvin
    'picokelvin': (1e-12, (('[temperature]', 1),)),  # picokelvin
    'fK': (1e-15, (('[temperature]', 1),)),  # femtokelvin
    'femtokelvin': (1e-15, (('[temperature]', 1),)),  # femtokelvin
    'aK': (1e-18, (('[temperature]', 1),)),  # attokelvin
    'attokelvin': (1e-18, (('[temperature]', 1),)),  # attokelvin
    'zK': (1e-21, (('[temperature]', 1),)),  # zeptokelvin
    'zeptokelvin': (1e-21, (('[temperature]', 1),)),  # zeptokelvin
    'yK': (1e-24, (('[temperature]', 1),)),  # yoctokelvin
    'yoctokelvin': (1e-24, (('[temperature]', 1),)),  # yoctokelvin
    'mol': (1.0, (('[substance]', 1),)),  # mole
    'mole': (1.0, (('[substance]', 1),)),  # mole
    'Ymol': (1e+24, (('[substance]', 1),)),  # yottamole
    'yottamole': (1e+24, (('[substance]', 1),)),  # yottamole
    'Zmol': (1e+21, (('[substance]', 1),)),  # zettamole
    'zettamole': (1e+21, (('[substance]', 1),)),  # zettamole
    'Emol': (1e+18, (('[substance]', 1),)),  # examole
    'examole': (1e+18, (('[substance]', 1),)),  # examole
    'Pmol': (1000000000000000.0, (('[substance]', 1),)),  # petamole
    'petamole': (1000000000000000.0, (('[substance]', 1),)),  # petamole
    'Tmol': (1000000000000.0, (('[substance]', 1),)),  # teramole
    'teramole': (1000000000000.0, (('[substance]', 1),)),  # teramole
    'Gmol': (1000000000.0, (('[substance]', 1),)),  # gigamole
    'gigamole': (1000000000.0, (('[substance]', 1),)),  # gigamole
    'Mmol': (1000000.0, (('[substance]', 1),)),  # megamole
    'megamole': (1000000.0, (('[substance]', 1),)),  # megamole
    'kmol': (1000.0, (('[substance]', 1),)),  # kilomole
    'kilomole': (1000.0, (('[substance]', 1),)),  # kilomole
    'hmol': (100.0, (('[substance]', 1),)),  # hectomole
    'hectomole': (100.0, (('[substance]', 1),)),  # hectomole
    'damol': (10.0, (('[substance]', 1),)),  # decamole
    'decamole': (10.0, (('[substance]', 1),)),  # decamole
    'dmol': (0.1, (('[substance]', 1),)),  # decimole
    'decimole': (0.1, (('[substance]', 1),)),  # decimole
    'cmol': (0.01, (('[substance]', 1),)),  # centimole
    'centimole': (0.01, (('[substance]', 1),)),  # centimole
    'mmol': (0.001, (('[substance]', 1),)),  # millimole
    'millimole': (0.001, (('[substance]', 1),)),  # millimole
    'umol': (1e-06, (('[substance]', 1),)),  # micromole
    'micromole': (1e-06, (('[substance]', 1),)),  # micromole
    'nmol': (1e-09, (('[substance]', 1),)),  # nanomole
    'nanomole': (1e-09, (('[substance]', 1),)),  # nanomole
    'pmol': (1e-12, (('[substance]', 1),)),  # picomole
    'picomole': (1e-12, (('[substance]', 1),)),  # picomole
    'fmol': (1e-15, (('[substance]', 1),)),  # femtomole
    'femtomole': (1e-15, (('[substance]', 1),)),  # femtomole
    'amol': (1e-18, (('[substance]', 1),)),  # attomole
    'attomole': (1e-18, (('[substance]', 1),)),  # attomole
    'zmol': (1e-21, (('[substance]', 1),)),  # zeptomole
    'zeptomole': (1e-21, (('[substance]', 1),)),  # zeptomole
    'ymol': (1e-24, (('[substance]', 1),)),  # yoctomole
    'yoctomole': (1e-24, (('[substance]', 1),)),  # yoctomole
    'cd': (1.0, (('[luminosity]', 1),)),  # candela
    'candela': (1.0, (('[luminosity]', 1),)),  # candela
    'Ycd': (1e+24, (('[luminosity]', 1),)),  # yottacandela
    'yottacandela': (1e+24, (('[luminosity]', 1),)),  # yottacandela
    'Zcd': (1e+21, (('[luminosity]', 1),)),  # zettacandela
    'zettacandela': (1e+21, (('[luminosity]', 1),)),  # zettacandela
    'Ecd': (1e+18, (('[luminosity]', 1),)),  # exacandela
    'exacandela': (1e+18, (('[luminosity]', 1),)),  # exacandela
    'Pcd': (1000000000000000.0, (('[luminosity]', 1),)),  # petacandela
    'petacandela': (1000000000000000.0, (('[luminosity]', 1),)),  # petacandela
    'Tcd': (1000000000000.0, (('[luminosity]', 1),)),  # teracandela
    'teracandela': (1000000000000.0, (('[luminosity]', 1),)),  # teracandela
    'Gcd': (1000000000.0, (('[luminosity]', 1),)),  # gigacandela
    'gigacandela': (1000000000.0, (('[luminosity]', 1),)),  # gigacandela
    'Mcd': (1000000.0, (('[luminosity]', 1),)),  # megacandela
    'megacandela': (1000000.0, (('[luminosity]', 1),)),  # megacandela
    'kcd': (1000.0, (('[luminosity]', 1),)),  # kilocandela
    'kilocandela': (1000.0, (('[luminosity]', 1),)),  # kilocandela
    'hcd': (100.0, (('[luminosity]', 1),)),  # hectocandela
    'hectocandela': (100.0, (('[luminosity]', 1),)),  # hectocandela
    'dacd': (10.0, (('[luminosity]', 1),)),  # decacandela
    'decacandela': (10.0, (('[luminosity]', 1),)),  # decacandela
    'dcd': (0.1, (('[luminosity]', 1),)),  # decicandela
    'decicandela': (0.1, (('[luminosity]', 1),)),  # decicandela
    'ccd': (0.01, (('[luminosity]', 1),)),  # centicandela
    'centicandela': (0.01, (('[luminosity]', 1),)),  # centicandela
    'millicandela': (0.001, (('[luminosity]', 1),)),  # millicandela
    'ucd': (1e-06, (('[luminosity]', 1),)),  # microcandela
    'microcandela': (1e-06, (('[luminosity]', 1),)),  # microcandela
    'ncd': (1e-09, (('[luminosity]', 1),)),  # nanocandela
    'nanocandela': (1e-09, (('[luminosity]', 1),)),  # nanocandela
    'pcd': (1e-12, (('[luminosity]', 1),)),  # picocandela
    'picocandela': (1e-12, (('[luminosity]', 1),)),  # picocandela
    'fcd': (1e-15, (('[luminosity]', 1),)),  # femtocandela
    'femtocandela': (1e-15, (('[luminosity]', 1),)),  # femtocandela
    'acd': (1e-18, (('[luminosity]', 1),)),  # attocandela
    'attocandela': (1e-18, (('[luminosity]', 1),)),  # attocandela
    'zcd': (1e-21, (('[luminosity]', 1),)),  # zeptocandela
    'zeptocandela': (1e-21, (('[luminosity]', 1),)),  # zeptocandela
    'ycd': (1e-24, (('[luminosity]', 1),)),  # yoctocandela
    'yoctocandela': (1e-24, (('[luminosity]', 1),)),  # yoctocandela
    'rad': (1.0, ()),  # radian
    'radian': (1.0, ()),  # radian
    'Yrad': (1e+24, ()),  # yottaradian
    'yottaradian': (1e+24, ()),  # yottaradian
    'Zrad': (1e+21, ()),  # zettaradian
    'zettaradian': (1e+21, ()),  # zettaradian
    'Erad': (1e+18, ()),  # exaradian
    'exaradian': (1e+18, ()),  # exaradian
    'Prad': (1000000000000000.0, ()),  # petaradian
    'petaradian': (1000000000000000.0, ()),  # petaradian
    'Trad': (1000000000000.0, ()),  # teraradian
    'teraradian': (1000000000000.0, ()),  # teraradian
    'Grad': (1000000000.0, ()),  # gigaradian
    'gigaradian': (1000000000.0, ()),  # gigaradian
    'Mrad': (1000000.0, ()),  # megaradian
    'megaradian': (1000000.0, ()),  # megaradian
    'krad': (1000.0, ()),  # kiloradian
    'kiloradian': (1000.0, ()),  # kiloradian
    'hrad': (100.0, ()),  # hectoradian
    'hectoradian': (100.0, ()),  # hectoradian
    'darad': (10.0, ()),  # decaradian
    'decaradian': (10.0, ()),  # decaradian
    'drad': (0.1, ()),  # deciradian
    'deciradian': (0.1, ()),  # deciradian
    'crad': (0.01, ()),  # centiradian
    'centiradian': (0.01, ()),  # centiradian
    'mrad': (0.001, ()),  # milliradian
    'milliradian': (0.001, ()),  # milliradian
    'urad': (1e-06, ()),  # microradian
    'microradian': (1e-06, ()),  # microradian
    'nrad': (1e-09, ()),  # nanoradian
    'nanoradian': (1e-09, ()),  # nanoradian
    'prad': (1e-12, ()),  # picoradian
    'picoradian': (1e-12, ()),  # picoradian
    'frad': (1e-15, ()),  # femtoradian
    'femtoradian': (1e-15, ()),  # femtoradian
    'arad': (1e-18, ()),  # attoradian
    'attoradian': (1e-18, ()),  # attoradian
    'zrad': (1e-21, ()),  # zeptoradian
    'zeptoradian': (1e-21, ()),  # zeptoradian
    'yrad': (1e-24, ()),  # yoctoradian
    'yoctoradian': (1e-24, ()),  # yoctoradian
    'sr': (1.0, ()),  # steradian
    'steradian': (1.0, ()),  # steradian
    'Ysr': (1e+24, ()),  # yottasteradian
    'yottasteradian': (1e+24, ()),  # yottasteradian
    'Zsr': (1e+21, ()),  # zettasteradian
    'zettasteradian': (1e+21, ()),  # zettasteradian
    'Esr': (1e+18, ()),  # exasteradian
    'exasteradian': (1e+18, ()),  # exasteradian
    'Psr': (1000000000000000.0, ()),  # petasteradian
    'petasteradian': (1000000000000000.0, ()),  # petasteradian
    'Tsr': (1000000000000.0, ()),  # terasteradian
    'terasteradian': (1000000000000.0, ()),  # terasteradian
    'Gsr': (1000000000.0, ()),  # gigasteradian
    'gigasteradian': (1000000000.0, ()),  # gigasteradian
    'Msr': (1000000.0, ()),  # megasteradian
    'megasteradian': (1000000.0, ()),  # megasteradian
    'ksr': (1000.0, ()),  # kilosteradian
    'kilosteradian': (1000.0, ()),  # kilosteradian
    'hsr': (100.0, ()),  # hectosteradian
    'hectosteradian': (100.0, ()),  # hectosteradian
    'dasr': (10.0, ()),  # decasteradian
    'decasteradian': (10.0, ()),  # decasteradian
    'dsr': (0.1, ()),  # decisteradian
    'decisteradian': (0.1, ()),  # decisteradian
    'csr': (0.01, ()),  # centisteradian
    'centisteradian': (0.01, ()),  # centisteradian
    'msr': (0.001, ()),  # millisteradian
    'millisteradian': (0.001, ()),  # millisteradian
    'usr': (1e-06, ()),  # microsteradian
    'microsteradian': (1e-06, ()),  # microsteradian
    'nsr': (1e-09, ()),  # nanosteradian
    'nanosteradian': (1e-09, ()),  # nanosteradian
    'psr': (1e-12, ()),  # picosteradian
    'picosteradian': (1e-12, ()),  # picosteradian
    'fsr': (1e-15, ()),  # femtosteradian
    'femtosteradian': (1e-15, ()),  # femtosteradian
    'asr': (1e-18, ()),  # attosteradian
    'attosteradian': (1e-18, ()),  # attosteradian
    'zsr': (1e-21, ()),  # zeptosteradian
    'zeptosteradian': (1e-21, ()),  # zeptosteradian
    'ysr': (1e-24, ()),  # yoctosteradian
    'yoctosteradian': (1e-24, ()),  # yoctosteradian
    'Hz': (1.0, (('[time]', -1),)),  # hertz
    'hertz': (1.0, (('[time]', -1),)),  # hertz
    'YHz': (1e+24, (('[time]', -1),)),  # yottahertz
    'yottahertz': (1e+24, (('[time]', -1),)),  # yottahertz
    'ZHz': (1e+21, (('[time]', -1),)),  # zettahertz
    'zettahertz': (1e+21, (('[time]', -1),)),  # zettahertz
    'EHz': (1e+18, (('[time]', -1),)),  # exahertz
    'exahertz': (1e+18, (('[time]', -1),)),  # exahertz
    'PHz': (1000000000000000.0, (('[time]', -1),)),  # petahertz
    'petahertz': (1000000000000000.0, (('[time]', -1),)),  # petahertz
    'THz': (1000000000000.0, (('[time]', -1),)),  # terahertz
    'terahertz': (1000000000000.0, (('[time]', -1),)),  # terahertz
    'GHz': (1000000000.0, (('[time]', -1),)),  # gigahertz
    'gigahertz': (1000000000.0, (('[time]', -1),)),  # gigahertz
    'MHz': (1000000.0, (('[time]', -1),)),  # megahertz
    'megahertz': (1000000.0, (('[time]', -1),)),  # megahertz
    'kHz': (1000.0, (('[time]', -1),)),  # kilohertz
    'kilohertz': (1000.0, (('[time]', -1),)),  # kilohertz
    'hHz': (100.0, (('[time]', -1),)),  # hectohertz
    'hectohertz': (100.0, (('[time]', -1),)),  # hectohertz
    'daHz': (10.0, (('[time]', -1),)),  # decahertz
    'decahertz': (10.0, (('[time]', -1),)),  # decahertz
    'dHz': (0.1, (('[time]', -1),)),  # decihertz
    'decihertz': (0.1, (('[time]', -1),)),  # decihertz
    'cHz': (0.01, (('[time]', -1),)),  # centihertz
    'centihertz': (0.01, (('[time]', -1),)),  # centihertz
    'mHz': (0.001, (('[time]', -1),)),  # millihertz
    'millihertz': (0.001, (('[time]', -1),)),  # millihertz
    'uHz': (1e-06, (('[time]', -1),)),  # microhertz
    'microhertz': (1e-06, (('[time]', -1),)),  # microhertz
    'nHz': (1e-09, (('[time]', -1),)),  # nanohertz
    'nanohertz': (1e-09, (('[time]', -1),)),  # nanohertz
    'pHz': (1e-12, (('[time]', -1),)),  # picohertz
    'picohertz': (1e-12, (('[time]', -1),)),  # picohertz
    'fHz': (1e-15, (('[time]', -1),)),  # femtohertz
    'femtohertz': (1e-15, (('[time]', -1),)),  # femtohertz
    'aHz': (1e-18, (('[time]', -1),)),  # attohertz
    'attohertz': (1e-18, (('[time]', -1),)),  # attohertz
    'zHz': (1e-21, (('[time]', -1),)),  # zeptohertz
    'zeptohertz': (1e-21, (('[time]', -1),)),  # zeptohertz
    'yHz': (1e-24, (('[time]', -1),)),  # yoctohertz
    'yoctohertz': (1e-24, (('[time]', -1),)),  # yoctohertz
    'N': (1.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # newton
    'newton': (1.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # newton
    'YN': (1e+24, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # yottanewton
    'yottanewton': (1e+24, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # yottanewton
    'ZN': (1e+21, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # zettanewton
    'zettanewton': (1e+21, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # zettanewton
    'EN': (1e+18, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # exanewton
    'exanewton': (1e+18, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # exanewton
    'PN': (1000000000000000.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # petanewton
    'petanewton': (1000000000000000.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # petanewton
    'TN': (1000000000000.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # teranewton
    'teranewton': (1000000000000.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # teranewton
    'GN': (1000000000.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # giganewton
    'giganewton': (1000000000.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # giganewton
    'MN': (1000000.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # meganewton
    'meganewton': (1000000.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # meganewton
    'kN': (1000.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # kilonewton
    'kilonewton': (1000.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # kilonewton
    'hN': (100.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # hectonewton
    'hectonewton': (100.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # hectonewton
    'daN': (10.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # decanewton
    'decanewton': (10.0, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # decanewton
    'dN': (0.1, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # decinewton
    'decinewton': (0.1, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # decinewton
    'cN': (0.01, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # centinewton
    'centinewton': (0.01, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # centinewton
    'mN': (0.001, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # millinewton
    'millinewton': (0.001, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # millinewton
    'uN': (1e-06, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # micronewton
    'micronewton': (1e-06, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # micronewton
    'nN': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # nanonewton
    'nanonewton': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # nanonewton
    'pN': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # piconewton
    'piconewton': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # piconewton
    'fN': (1e-15, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # femtonewton
    'femtonewton': (1e-15, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # femtonewton
    'aN': (1e-18, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # attonewton
    'attonewton': (1e-18, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # attonewton
    'zN': (1e-21, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # zeptonewton
    'zeptonewton': (1e-21, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # zeptonewton
    'yN': (1e-24, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # yoctonewton
    'yoctonewton': (1e-24, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # yoctonewton
    'Pa': (1.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # pascal
    'pascal': (1.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # pascal
    'YPa': (1e+24, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # yottapascal
    'yottapascal': (1e+24, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # yottapascal
    'ZPa': (1e+21, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # zettapascal
    'zettapascal': (1e+21, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # zettapascal
    'EPa': (1e+18, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # exapascal
    'exapascal': (1e+18, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # exapascal
    'PPa': (1000000000000000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # petapascal
    'petapascal': (1000000000000000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # petapascal
    'TPa': (1000000000000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # terapascal
    'terapascal': (1000000000000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # terapascal
    'GPa': (1000000000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # gigapascal
    'gigapascal': (1000000000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # gigapascal
    'MPa': (1000000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # megapascal
    'megapascal': (1000000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # megapascal
    'kPa': (1000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # kilopascal
    'kilopascal': (1000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # kilopascal
    'hPa': (100.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # hectopascal
    'hectopascal': (100.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # hectopascal
    'daPa': (10.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # decapascal
    'decapascal': (10.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # decapascal
    'dPa': (0.1, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # decipascal
    'decipascal': (0.1, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # decipascal
    'cPa': (0.01, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # centipascal
    'centipascal': (0.01, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # centipascal
    'mPa': (0.001, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # millipascal
    'millipascal': (0.001, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # millipascal
    'uPa': (1e-06, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # micropascal
    'micropascal': (1e-06, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # micropascal
    'nPa': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # nanopascal
    'nanopascal': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # nanopascal
    'pPa': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # picopascal
    'picopascal': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # picopascal
    'fPa': (1e-15, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # femtopascal
    'femtopascal': (1e-15, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # femtopascal
    'aPa': (1e-18, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # attopascal
    'attopascal': (1e-18, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # attopascal
    'zPa': (1e-21, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # zeptopascal
    'zeptopascal': (1e-21, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # zeptopascal
    'yPa': (1e-24, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # yoctopascal
    'yoctopascal': (1e-24, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # yoctopascal
    'J': (1.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # joule
    'joule': (1.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # joule
    'YJ': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # yottajoule
    'yottajoule': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # yottajoule
    'ZJ': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # zettajoule
    'zettajoule': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # zettajoule
    'EJ': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # exajoule
    'exajoule': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # exajoule
    'PJ': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # petajoule
    'petajoule': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # petajoule
    'TJ': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # terajoule
    'terajoule': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # terajoule
    'GJ': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # gigajoule
    'gigajoule': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # gigajoule
    'MJ': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # megajoule
    'megajoule': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # megajoule
    'kJ': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # kilojoule
    'kilojoule': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # kilojoule
    'hJ': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # hectojoule
    'hectojoule': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # hectojoule
    'daJ': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # decajoule
    'decajoule': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # decajoule
    'dJ': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # decijoule
    'decijoule': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # decijoule
    'cJ': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # centijoule
    'centijoule': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # centijoule
    'mJ': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # millijoule
    'millijoule': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # millijoule
    'uJ': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # microjoule
    'microjoule': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # microjoule
    'nJ': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # nanojoule
    'nanojoule': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # nanojoule
    'pJ': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # picojoule
    'picojoule': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # picojoule
    'fJ': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # femtojoule
    'femtojoule': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # femtojoule
    'aJ': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # attojoule
    'attojoule': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # attojoule
    'zJ': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # zeptojoule
    'zeptojoule': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # zeptojoule
    'yJ': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # yoctojoule
    'yoctojoule': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # yoctojoule
    'W': (1.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # watt
    'watt': (1.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # watt
    'YW': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # yottawatt
    'yottawatt': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # yottawatt
    'ZW': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # zettawatt
    'zettawatt': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # zettawatt
    'EW': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # exawatt
    'exawatt': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # exawatt
    'PW': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # petawatt
    'petawatt': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # petawatt
    'TW': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # terawatt
    'terawatt': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # terawatt
    'GW': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # gigawatt
    'gigawatt': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # gigawatt
    'MW': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # megawatt
    'megawatt': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # megawatt
    'kW': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # kilowatt
    'kilowatt': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # kilowatt
    'hW': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # hectowatt
    'hectowatt': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # hectowatt
    'daW': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # decawatt
    'decawatt': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # decawatt
    'dW': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # deciwatt
    'deciwatt': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # deciwatt
    'cW': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # centiwatt
    'centiwatt': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # centiwatt
    'mW': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # milliwatt
    'milliwatt': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # milliwatt
    'uW': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # microwatt
    'microwatt': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # microwatt
    'nW': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # nanowatt
    'nanowatt': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # nanowatt
    'pW': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # picowatt
    'picowatt': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # picowatt
    'fW': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # femtowatt
    'femtowatt': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # femtowatt
    'aW': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # attowatt
    'attowatt': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # attowatt
    'zW': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # zeptowatt
    'zeptowatt': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # zeptowatt
    'yW': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # yoctowatt
    'yoctowatt': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # yoctowatt
    'C': (1.0, (('[time]', 1), ('[current]', 1))),  # coulomb
    'coulomb': (1.0, (('[time]', 1), ('[current]', 1))),  # coulomb
    'YC': (1e+24, (('[time]', 1), ('[current]', 1))),  # yottacoulomb
    'yottacoulomb': (1e+24, (('[time]', 1), ('[current]', 1))),  # yottacoulomb
    'ZC': (1e+21, (('[time]', 1), ('[current]', 1))),  # zettacoulomb
    'zettacoulomb': (1e+21, (('[time]', 1), ('[current]', 1))),  # zettacoulomb
    'EC': (1e+18, (('[time]', 1), ('[current]', 1))),  # exacoulomb
    'exacoulomb': (1e+18, (('[time]', 1), ('[current]', 1))),  # exacoulomb
    'PC': (1000000000000000.0, (('[time]', 1), ('[current]', 1))),  # petacoulomb
    'petacoulomb': (1000000000000000.0, (('[time]', 1), ('[current]', 1))),  # petacoulomb
    'TC': (1000000000000.0, (('[time]', 1), ('[current]', 1))),  # teracoulomb
    'teracoulomb': (1000000000000.0, (('[time]', 1), ('[current]', 1))),  # teracoulomb
    'GC': (1000000000.0, (('[time]', 1), ('[current]', 1))),  # gigacoulomb
    'gigacoulomb': (1000000000.0, (('[time]', 1), ('[current]', 1))),  # gigacoulomb
    'MC': (1000000.0, (('[time]', 1), ('[current]', 1))),  # megacoulomb
    'megacoulomb': (1000000.0, (('[time]', 1), ('[current]', 1))),  # megacoulomb
    'kC': (1000.0, (('[time]', 1), ('[current]', 1))),  # kilocoulomb
    'kilocoulomb': (1000.0, (('[time]', 1), ('[current]', 1))),  # kilocoulomb
    'hC': (100.0, (('[time]', 1), ('[current]', 1))),  # hectocoulomb
    'hectocoulomb': (100.0, (('[time]', 1), ('[current]', 1))),  # hectocoulomb
    'daC': (10.0, (('[time]', 1), ('[current]', 1))),  # decacoulomb
    'decacoulomb': (10.0, (('[time]', 1), ('[current]', 1))),  # decacoulomb
    'dC': (0.1, (('[time]', 1), ('[current]', 1))),  # decicoulomb
    'decicoulomb': (0.1, (('[time]', 1), ('[current]', 1))),  # decicoulomb
    'cC': (0.01, (('[time]', 1), ('[current]', 1))),  # centicoulomb
    'centicoulomb': (0.01, (('[time]', 1), ('[current]', 1))),  # centicoulomb
    'mC': (0.001, (('[time]', 1), ('[current]', 1))),  # millicoulomb
    'millicoulomb': (0.001, (('[time]', 1), ('[current]', 1))),  # millicoulomb
    'uC': (1e-06, (('[time]', 1), ('[current]', 1))),  # microcoulomb
    'microcoulomb': (1e-06, (('[time]', 1), ('[current]', 1))),  # microcoulomb
    'nC': (1e-09, (('[time]', 1), ('[current]', 1))),  # nanocoulomb
    'nanocoulomb': (1e-09, (('[time]', 1), ('[current]', 1))),  # nanocoulomb
    'pC': (1e-12, (('[time]', 1), ('[current]', 1))),  # picocoulomb
    'picocoulomb': (1e-12, (('[time]', 1), ('[current]', 1))),  # picocoulomb
    'fC': (1e-15, (('[time]', 1), ('[current]', 1))),  # femtocoulomb
    'femtocoulomb': (1e-15, (('[time]', 1), ('[current]', 1))),  # femtocoulomb
    'aC': (1e-18, (('[time]', 1), ('[current]', 1))),  # attocoulomb
    'attocoulomb': (1e-18, (('[time]', 1), ('[current]', 1))),  # attocoulomb
    'zC': (1e-21, (('[time]', 1), ('[current]', 1))),  # zeptocoulomb
    'zeptocoulomb': (1e-21, (('[time]', 1), ('[current]', 1))),  # zeptocoulomb
    'yC': (1e-24, (('[time]', 1), ('[current]', 1))),  # yoctocoulomb
    'yoctocoulomb': (1e-24, (('[time]', 1), ('[current]', 1))),  # yoctocoulomb
    'V': (1.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # volt
    'volt': (1.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # volt
    'YV': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # yottavolt
    'yottavolt': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # yottavolt
    'ZV': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # zettavolt
    'zettavolt': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # zettavolt
    'EV': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # exavolt
    'exavolt': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # exavolt
    'PV': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # petavolt
    'petavolt': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # petavolt
    'TV': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # teravolt
    'teravolt': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # teravolt
    'GV': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # gigavolt
    'gigavolt': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # gigavolt
    'MV': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # megavolt
    'megavolt': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # megavolt
    'kV': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # kilovolt
    'kilovolt': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # kilovolt
    'hV': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # hectovolt
    'hectovolt': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # hectovolt
    'daV': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # decavolt
    'decavolt': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # decavolt
    'dV': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # decivolt
    'decivolt': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # decivolt
    'cV': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # centivolt
    'centivolt': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # centivolt
    'mV': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # millivolt
    'millivolt': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # millivolt
    'uV': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # microvolt
    'microvolt': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # microvolt
    'nV': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # nanovolt
    'nanovolt': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # nanovolt
    'pV': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # picovolt
    'picovolt': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # picovolt
    'fV': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # femtovolt
    'femtovolt': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # femtovolt
    'aV': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # attovolt
    'attovolt': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # attovolt
    'zV': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # zeptovolt
    'zeptovolt': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # zeptovolt
    'yV': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # yoctovolt
    'yoctovolt': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -1))),  # yoctovolt
    'F': (1.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # farad
    'farad': (1.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # farad
    'YF': (1e+24, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # yottafarad
    'yottafarad': (1e+24, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # yottafarad
    'ZF': (1e+21, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # zettafarad
    'zettafarad': (1e+21, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # zettafarad
    'EF': (1e+18, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # exafarad
    'exafarad': (1e+18, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # exafarad
    'PF': (1000000000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # petafarad
    'petafarad': (1000000000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # petafarad
    'TF': (1000000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # terafarad
    'terafarad': (1000000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # terafarad
    'GF': (1000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # gigafarad
    'gigafarad': (1000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # gigafarad
    'MF': (1000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # megafarad
    'megafarad': (1000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # megafarad
    'kF': (1000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # kilofarad
    'kilofarad': (1000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # kilofarad
    'hF': (100.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # hectofarad
    'hectofarad': (100.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # hectofarad
    'daF': (10.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # decafarad
    'decafarad': (10.0, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # decafarad
    'dF': (0.1, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # decifarad
    'decifarad': (0.1, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # decifarad
    'cF': (0.01, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # centifarad
    'centifarad': (0.01, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # centifarad
    'mF': (0.001, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # millifarad
    'millifarad': (0.001, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # millifarad
    'uF': (1.0000000000000002e-06, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # microfarad
    'microfarad': (1.0000000000000002e-06, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # microfarad
    'nF': (1.0000000000000003e-09, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # nanofarad
    'nanofarad': (1.0000000000000003e-09, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # nanofarad
    'pF': (1e-12, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # picofarad
    'picofarad': (1e-12, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # picofarad
    'fF': (1e-15, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # femtofarad
    'femtofarad': (1e-15, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # femtofarad
    'aF': (1e-18, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # attofarad
    'attofarad': (1e-18, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # attofarad
    'zF': (1e-21, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # zeptofarad
    'zeptofarad': (1e-21, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # zeptofarad
    'yF': (1e-24, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # yoctofarad
    'yoctofarad': (1e-24, (('[mass]', -1), ('[length]', -2), ('[time]', 4), ('[current]', 2))),  # yoctofarad
    'ohm': (1.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # ohm
    'Yohm': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # yottaohm
    'yottaohm': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # yottaohm
    'Zohm': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # zettaohm
    'zettaohm': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # zettaohm
    'Eohm': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # exaohm
    'exaohm': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # exaohm
    'Pohm': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # petaohm
    'petaohm': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # petaohm
    'Tohm': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # teraohm
    'teraohm': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # teraohm
    'Gohm': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # gigaohm
    'gigaohm': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # gigaohm
    'Mohm': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # megaohm
    'megaohm': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # megaohm
    'kohm': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # kiloohm
    'kiloohm': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # kiloohm
    'hohm': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # hectoohm
    'hectoohm': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # hectoohm
    'daohm': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # decaohm
    'decaohm': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # decaohm
    'dohm': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # deciohm
    'deciohm': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # deciohm
    'cohm': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # centiohm
    'centiohm': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # centiohm
    'mohm': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # milliohm
    'milliohm': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # milliohm
    'uohm': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # microohm
    'microohm': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # microohm
    'nohm': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # nanoohm
    'nanoohm': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # nanoohm
    'pohm': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # picoohm
    'picoohm': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # picoohm
    'fohm': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # femtoohm
    'femtoohm': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # femtoohm
    'aohm': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # attoohm
    'attoohm': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # attoohm
    'zohm': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # zeptoohm
    'zeptoohm': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # zeptoohm
    'yohm': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # yoctoohm
    'yoctoohm': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -3), ('[current]', -2))),  # yoctoohm
    'S': (1.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # siemens
    'siemens': (1.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # siemens
    'YS': (1e+24, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # yottasiemens
    'yottasiemens': (1e+24, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # yottasiemens
    'ZS': (1e+21, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # zettasiemens
    'zettasiemens': (1e+21, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # zettasiemens
    'ES': (1e+18, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # exasiemens
    'exasiemens': (1e+18, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # exasiemens
    'PS': (1000000000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # petasiemens
    'petasiemens': (1000000000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # petasiemens
    'TS': (1000000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # terasiemens
    'terasiemens': (1000000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # terasiemens
    'GS': (1000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # gigasiemens
    'gigasiemens': (1000000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # gigasiemens
    'MS': (1000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # megasiemens
    'megasiemens': (1000000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # megasiemens
    'kS': (1000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # kilosiemens
    'kilosiemens': (1000.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # kilosiemens
    'hS': (100.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # hectosiemens
    'hectosiemens': (100.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # hectosiemens
    'daS': (10.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # decasiemens
    'decasiemens': (10.0, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # decasiemens
    'dS': (0.1, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # decisiemens
    'decisiemens': (0.1, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # decisiemens
    'cS': (0.01, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # centisiemens
    'centisiemens': (0.01, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # centisiemens
    'mS': (0.001, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # millisiemens
    'millisiemens': (0.001, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # millisiemens
    'uS': (1.0000000000000002e-06, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # microsiemens
    'microsiemens': (1.0000000000000002e-06, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # microsiemens
    'nS': (1.0000000000000003e-09, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # nanosiemens
    'nanosiemens': (1.0000000000000003e-09, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # nanosiemens
    'pS': (1e-12, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # picosiemens
    'picosiemens': (1e-12, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # picosiemens
    'fS': (1e-15, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # femtosiemens
    'femtosiemens': (1e-15, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # femtosiemens
    'aS': (1e-18, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # attosiemens
    'attosiemens': (1e-18, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # attosiemens
    'zS': (1e-21, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # zeptosiemens
    'zeptosiemens': (1e-21, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # zeptosiemens
    'yS': (1e-24, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # yoctosiemens
    'yoctosiemens': (1e-24, (('[mass]', -1), ('[length]', -2), ('[time]', 3), ('[current]', 2))),  # yoctosiemens
    'Wb': (1.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # weber
    'weber': (1.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # weber
    'YWb': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # yottaweber
    'yottaweber': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # yottaweber
    'ZWb': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # zettaweber
    'zettaweber': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # zettaweber
    'EWb': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # exaweber
    'exaweber': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # exaweber
    'PWb': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # petaweber
    'petaweber': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # petaweber
    'TWb': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # teraweber
    'teraweber': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # teraweber
    'GWb': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # gigaweber
    'gigaweber': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # gigaweber
    'MWb': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # megaweber
    'megaweber': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # megaweber
    'kWb': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # kiloweber
    'kiloweber': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # kiloweber
    'hWb': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # hectoweber
    'hectoweber': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # hectoweber
    'daWb': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # decaweber
    'decaweber': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # decaweber
    'dWb': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # deciweber
    'deciweber': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # deciweber
    'cWb': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # centiweber
    'centiweber': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # centiweber
    'mWb': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # milliweber
    'milliweber': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # milliweber
    'uWb': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # microweber
    'microweber': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # microweber
    'nWb': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # nanoweber
    'nanoweber': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # nanoweber
    'pWb': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # picoweber
    'picoweber': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # picoweber
    'fWb': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # femtoweber
    'femtoweber': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # femtoweber
    'aWb': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # attoweber
    'attoweber': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # attoweber
    'zWb': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # zeptoweber
    'zeptoweber': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # zeptoweber
    'yWb': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # yoctoweber
    'yoctoweber': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -1))),  # yoctoweber
    'T': (1.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # tesla
    'tesla': (1.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # tesla
    'YT': (1e+24, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # yottatesla
    'yottatesla': (1e+24, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # yottatesla
    'ZT': (1e+21, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # zettatesla
    'zettatesla': (1e+21, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # zettatesla
    'ET': (1e+18, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # exatesla
    'exatesla': (1e+18, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # exatesla
    'PT': (1000000000000000.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # petatesla
    'petatesla': (1000000000000000.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # petatesla
    'TT': (1000000000000.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # teratesla
    'teratesla': (1000000000000.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # teratesla
    'GT': (1000000000.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # gigatesla
    'gigatesla': (1000000000.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # gigatesla
    'MT': (1000000.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # megatesla
    'megatesla': (1000000.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # megatesla
    'kT': (1000.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # kilotesla
    'kilotesla': (1000.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # kilotesla
    'hT': (100.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # hectotesla
    'hectotesla': (100.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # hectotesla
    'daT': (10.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # decatesla
    'decatesla': (10.0, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # decatesla
    'dT': (0.1, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # decitesla
    'decitesla': (0.1, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # decitesla
    'cT': (0.01, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # centitesla
    'centitesla': (0.01, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # centitesla
    'mT': (0.001, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # millitesla
    'millitesla': (0.001, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # millitesla
    'uT': (1e-06, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # microtesla
    'microtesla': (1e-06, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # microtesla
    'nT': (1.0000000000000003e-09, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # nanotesla
    'nanotesla': (1.0000000000000003e-09, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # nanotesla
    'pT': (1.0000000000000002e-12, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # picotesla
    'picotesla': (1.0000000000000002e-12, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # picotesla
    'fT': (1e-15, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # femtotesla
    'femtotesla': (1e-15, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # femtotesla
    'aT': (1e-18, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # attotesla
    'attotesla': (1e-18, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # attotesla
    'zT': (1e-21, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # zeptotesla
    'zeptotesla': (1e-21, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # zeptotesla
    'yT': (1e-24, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # yoctotesla
    'yoctotesla': (1e-24, (('[mass]', 1), ('[time]', -2), ('[current]', -1))),  # yoctotesla
    'H': (1.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # henry
    'henry': (1.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # henry
    'YH': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # yottahenry
    'yottahenry': (1e+24, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # yottahenry
    'ZH': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # zettahenry
    'zettahenry': (1e+21, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # zettahenry
    'EH': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # exahenry
    'exahenry': (1e+18, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # exahenry
    'PH': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # petahenry
    'petahenry': (1000000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # petahenry
    'TH': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # terahenry
    'terahenry': (1000000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # terahenry
    'GH': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # gigahenry
    'gigahenry': (1000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # gigahenry
    'MH': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # megahenry
    'megahenry': (1000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # megahenry
    'kH': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # kilohenry
    'kilohenry': (1000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # kilohenry
    'hH': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # hectohenry
    'hectohenry': (100.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # hectohenry
    'daH': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # decahenry
    'decahenry': (10.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # decahenry
    'dH': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # decihenry
    'decihenry': (0.1, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # decihenry
    'cH': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # centihenry
    'centihenry': (0.01, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # centihenry
    'mH': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # millihenry
    'millihenry': (0.001, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # millihenry
    'uH': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # microhenry
    'microhenry': (1e-06, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # microhenry
    'nH': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # nanohenry
    'nanohenry': (1.0000000000000003e-09, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # nanohenry
    'pH': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # picohenry
    'picohenry': (1.0000000000000002e-12, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # picohenry
    'fH': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # femtohenry
    'femtohenry': (1e-15, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # femtohenry
    'aH': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # attohenry
    'attohenry': (1e-18, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # attohenry
    'zH': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # zeptohenry
    'zeptohenry': (1e-21, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # zeptohenry
    'yH': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # yoctohenry
    'yoctohenry': (1e-24, (('[mass]', 1), ('[length]', 2), ('[time]', -2), ('[current]', -2))),  # yoctohenry
    'lm': (1.0, (('[luminosity]', 1),)),  # lumen
    'lumen': (1.0, (('[luminosity]', 1),)),  # lumen
    'Ylm': (1e+24, (('[luminosity]', 1),)),  # yottalumen
    'yottalumen': (1e+24, (('[luminosity]', 1),)),  # yottalumen
    'Zlm': (1e+21, (('[luminosity]', 1),)),  # zettalumen
    'zettalumen': (1e+21, (('[luminosity]', 1),)),  # zettalumen
    'Elm': (1e+18, (('[luminosity]', 1),)),  # exalumen
    'exalumen': (1e+18, (('[luminosity]', 1),)),  # exalumen
    'Plm': (1000000000000000.0, (('[luminosity]', 1),)),  # petalumen
    'petalumen': (1000000000000000.0, (('[luminosity]', 1),)),  # petalumen
    'Tlm': (1000000000000.0, (('[luminosity]', 1),)),  # teralumen
    'teralumen': (1000000000000.0, (('[luminosity]', 1),)),  # teralumen
    'Glm': (1000000000.0, (('[luminosity]', 1),)),  # gigalumen
    'gigalumen': (1000000000.0, (('[luminosity]', 1),)),  # gigalumen
    'Mlm': (1000000.0, (('[luminosity]', 1),)),  # megalumen
    'megalumen': (1000000.0, (('[luminosity]', 1),)),  # megalumen
    'klm': (1000.0, (('[luminosity]', 1),)),  # kilolumen
    'kilolumen': (1000.0, (('[luminosity]', 1),)),  # kilolumen
    'hlm': (100.0, (('[luminosity]', 1),)),  # hectolumen
    'hectolumen': (100.0, (('[luminosity]', 1),)),  # hectolumen
    'dalm': (10.0, (('[luminosity]', 1),)),  # decalumen
    'decalumen': (10.0, (('[luminosity]', 1),)),  # decalumen
    'dlm': (0.1, (('[luminosity]', 1),)),  # decilumen
    'decilumen': (0.1, (('[luminosity]', 1),)),  # decilumen
    'clm': (0.01, (('[luminosity]', 1),)),  # centilumen
    'centilumen': (0.01, (('[luminosity]', 1),)),  # centilumen
    'mlm': (0.001, (('[luminosity]', 1),)),  # millilumen
    'millilumen': (0.001, (('[luminosity]', 1),)),  # millilumen
    'ulm': (1e-06, (('[luminosity]', 1),)),  # microlumen
    'microlumen': (1e-06, (('[luminosity]', 1),)),  # microlumen
    'nlm': (1e-09, (('[luminosity]', 1),)),  # nanolumen
    'nanolumen': (1e-09, (('[luminosity]', 1),)),  # nanolumen
    'plm': (1e-12, (('[luminosity]', 1),)),  # picolumen
    'picolumen': (1e-12, (('[luminosity]', 1),)),  # picolumen
    'flm': (1e-15, (('[luminosity]', 1),)),  # femtolumen
    'femtolumen': (1e-15, (('[luminosity]', 1),)),  # femtolumen
    'alm': (1e-18, (('[luminosity]', 1),)),  # attolumen
    'attolumen': (1e-18, (('[luminosity]', 1),)),  # attolumen
    'zlm': (1e-21, (('[luminosity]', 1),)),  # zeptolumen
    'zeptolumen': (1e-21, (('[luminosity]', 1),)),  # zeptolumen
    'ylm': (1e-24, (('[luminosity]', 1),)),  # yoctolumen
    'yoctolumen': (1e-24, (('[luminosity]', 1),)),  # yoctolumen
    'lx': (1.0, (('[length]', -2), ('[luminosity]', 1))),  # lux
    'lux': (1.0, (('[length]', -2), ('[luminosity]', 1))),  # lux
    'Ylx': (1e+24, (('[length]', -2), ('[luminosity]', 1))),  # yottalux
    'yottalux': (1e+24, (('[length]', -2), ('[luminosity]', 1))),  # yottalux
    'Zlx': (1e+21, (('[length]', -2), ('[luminosity]', 1))),  # zettalux
    'zettalux': (1e+21, (('[length]', -2), ('[luminosity]', 1))),  # zettalux
    'Elx': (1e+18, (('[length]', -2), ('[luminosity]', 1))),  # exalux
    'exalux': (1e+18, (('[length]', -2), ('[luminosity]', 1))),  # exalux
    'Plx': (1000000000000000.0, (('[length]', -2), ('[luminosity]', 1))),  # petalux
    'petalux': (1000000000000000.0, (('[length]', -2), ('[luminosity]', 1))),  # petalux
    'Tlx': (1000000000000.0, (('[length]', -2), ('[luminosity]', 1))),  # teralux
    'teralux': (1000000000000.0, (('[length]', -2), ('[luminosity]', 1))),  # teralux
    'Glx': (1000000000.0, (('[length]', -2), ('[luminosity]', 1))),  # gigalux
    'gigalux': (1000000000.0, (('[length]', -2), ('[luminosity]', 1))),  # gigalux
    'Mlx': (1000000.0, (('[length]', -2), ('[luminosity]', 1))),  # megalux
    'megalux': (1000000.0, (('[length]', -2), ('[luminosity]', 1))),  # megalux
    'klx': (1000.0, (('[length]', -2), ('[luminosity]', 1))),  # kilolux
    'kilolux': (1000.0, (('[length]', -2), ('[luminosity]', 1))),  # kilolux
    'hlx': (100.0, (('[length]', -2), ('[luminosity]', 1))),  # hectolux
    'hectolux': (100.0, (('[length]', -2), ('[luminosity]', 1))),  # hectolux
    'dalx': (10.0, (('[length]', -2), ('[luminosity]', 1))),  # decalux
    'decalux': (10.0, (('[length]', -2), ('[luminosity]', 1))),  # decalux
    'dlx': (0.1, (('[length]', -2), ('[luminosity]', 1))),  # decilux
    'decilux': (0.1, (('[length]', -2), ('[luminosity]', 1))),  # decilux
    'clx': (0.01, (('[length]', -2), ('[luminosity]', 1))),  # centilux
    'centilux': (0.01, (('[length]', -2), ('[luminosity]', 1))),  # centilux
    'mlx': (0.001, (('[length]', -2), ('[luminosity]', 1))),  # millilux
    'millilux': (0.001, (('[length]', -2), ('[luminosity]', 1))),  # millilux
    'ulx': (1e-06, (('[length]', -2), ('[luminosity]', 1))),  # microlux
    'microlux': (1e-06, (('[length]', -2), ('[luminosity]', 1))),  # microlux
    'nlx': (1e-09, (('[length]', -2), ('[luminosity]', 1))),  # nanolux
    'nanolux': (1e-09, (('[length]', -2), ('[luminosity]', 1))),  # nanolux
    'plx': (1e-12, (('[length]', -2), ('[luminosity]', 1))),  # picolux
    'picolux': (1e-12, (('[length]', -2), ('[luminosity]', 1))),  # picolux
    'flx': (1e-15, (('[length]', -2), ('[luminosity]', 1))),  # femtolux
    'femtolux': (1e-15, (('[length]', -2), ('[luminosity]', 1))),  # femtolux
    'alx': (1e-18, (('[length]', -2), ('[luminosity]', 1))),  # attolux
    'attolux': (1e-18, (('[length]', -2), ('[luminosity]', 1))),  # attolux
    'zlx': (1e-21, (('[length]', -2), ('[luminosity]', 1))),  # zeptolux
    'zeptolux': (1e-21, (('[length]', -2), ('[luminosity]', 1))),  # zeptolux
    'ylx': (1e-24, (('[length]', -2), ('[luminosity]', 1))),  # yoctolux
    'yoctolux': (1e-24, (('[length]', -2), ('[luminosity]', 1))),  # yoctolux
    'Bq': (1.0, (('[time]', -1),)),  # becquerel
    'becquerel': (1.0, (('[time]', -1),)),  # becquerel
    'YBq': (1e+24, (('[time]', -1),)),  # yottabecquerel
    'yottabecquerel': (1e+24, (('[time]', -1),)),  # yottabecquerel
    'ZBq': (1e+21, (('[time]', -1),)),  # zettabecquerel
    'zettabecquerel': (1e+21, (('[time]', -1),)),  # zettabecquerel
    'EBq': (1e+18, (('[time]', -1),)),  # exabecquerel
    'exabecquerel': (1e+18, (('[time]', -1),)),  # exabecquerel
    'PBq': (1000000000000000.0, (('[time]', -1),)),  # petabecquerel
    'petabecquerel': (1000000000000000.0, (('[time]', -1),)),  # petabecquerel
    'TBq': (1000000000000.0, (('[time]', -1),)),  # terabecquerel
    'terabecquerel': (1000000000000.0, (('[time]', -1),)),  # terabecquerel
    'GBq': (1000000000.0, (('[time]', -1),)),  # gigabecquerel
    'gigabecquerel': (1000000000.0, (('[time]', -1),)),  # gigabecquerel
    'MBq': (1000000.0, (('[time]', -1),)),  # megabecquerel
    'megabecquerel': (1000000.0, (('[time]', -1),)),  # megabecquerel
    'kBq': (1000.0, (('[time]', -1),)),  # kilobecquerel
    'kilobecquerel': (1000.0, (('[time]', -1),)),  # kilobecquerel
    'hBq': (100.0, (('[time]', -1),)),  # hectobecquerel
    'hectobecquerel': (100.0, (('[time]', -1),)),  # hectobecquerel
    'daBq': (10.0, (('[time]', -1),)),  # decabecquerel
    'decabecquerel': (10.0, (('[time]', -1),)),  # decabecquerel
    'dBq': (0.1, (('[time]', -1),)),  # decibecquerel
    'decibecquerel': (0.1, (('[time]', -1),)),  # decibecquerel
    'cBq': (0.01, (('[time]', -1),)),  # centibecquerel
    'centibecquerel': (0.01, (('[time]', -1),)),  # centibecquerel
    'mBq': (0.001, (('[time]', -1),)),  # millibecquerel
    'millibecquerel': (0.001, (('[time]', -1),)),  # millibecquerel
    'uBq': (1e-06, (('[time]', -1),)),  # microbecquerel
    'microbecquerel': (1e-06, (('[time]', -1),)),  # microbecquerel
    'nBq': (1e-09, (('[time]', -1),)),  # nanobecquerel
    'nanobecquerel': (1e-09, (('[time]', -1),)),  # nanobecquerel
    'pBq': (1e-12, (('[time]', -1),)),  # picobecquerel
    'picobecquerel': (1e-12, (('[time]', -1),)),  # picobecquerel
    'fBq': (1e-15, (('[time]', -1),)),  # femtobecquerel
    'femtobecquerel': (1e-15, (('[time]', -1),)),  # femtobecquerel
    'aBq': (1e-18, (('[time]', -1),)),  # attobecquerel
    'attobecquerel': (1e-18, (('[time]', -1),)),  # attobecquerel
    'zBq': (1e-21, (('[time]', -1),)),  # zeptobecquerel
    'zeptobecquerel': (1e-21, (('[time]', -1),)),  # zeptobecquerel
    'yBq': (1e-24, (('[time]', -1),)),  # yoctobecquerel
    'yoctobecquerel': (1e-24, (('[time]', -1),)),  # yoctobecquerel
    'Gy': (1.0, (('[length]', 2), ('[time]', -2))),  # gray
    'gray': (1.0, (('[length]', 2), ('[time]', -2))),  # gray
    'YGy': (1e+24, (('[length]', 2), ('[time]', -2))),  # yottagray
    'yottagray': (1e+24, (('[length]', 2), ('[time]', -2))),  # yottagray
    'ZGy': (1e+21, (('[length]', 2), ('[time]', -2))),  # zettagray
    'zettagray': (1e+21, (('[length]', 2), ('[time]', -2))),  # zettagray
    'EGy': (1e+18, (('[length]', 2), ('[time]', -2))),  # exagray
    'exagray': (1e+18, (('[length]', 2), ('[time]', -2))),  # exagray
    'PGy': (1000000000000000.0, (('[length]', 2), ('[time]', -2))),  # petagray
    'petagray': (1000000000000000.0, (('[length]', 2), ('[time]', -2))),  # petagray
    'TGy': (1000000000000.0, (('[length]', 2), ('[time]', -2))),  # teragray
    'teragray': (1000000000000.0, (('[length]', 2), ('[time]', -2))),  # teragray
    'GGy': (1000000000.0, (('[length]', 2), ('[time]', -2))),  # gigagray
    'gigagray': (1000000000.0, (('[length]', 2), ('[time]', -2))),  # gigagray
    'MGy': (1000000.0, (('[length]', 2), ('[time]', -2))),  # megagray
    'megagray': (1000000.0, (('[length]', 2), ('[time]', -2))),  # megagray
    'kGy': (1000.0, (('[length]', 2), ('[time]', -2))),  # kilogray
    'kilogray': (1000.0, (('[length]', 2), ('[time]', -2))),  # kilogray
    'hGy': (100.0, (('[length]', 2), ('[time]', -2))),  # hectogray
    'hectogray': (100.0, (('[length]', 2), ('[time]', -2))),  # hectogray
    'daGy': (10.0, (('[length]', 2), ('[time]', -2))),  # decagray
    'decagray': (10.0, (('[length]', 2), ('[time]', -2))),  # decagray
    'dGy': (0.1, (('[length]', 2), ('[time]', -2))),  # decigray
    'decigray': (0.1, (('[length]', 2), ('[time]', -2))),  # decigray
    'cGy': (0.01, (('[length]', 2), ('[time]', -2))),  # centigray
    'centigray': (0.01, (('[length]', 2), ('[time]', -2))),  # centigray
    'mGy': (0.001, (('[length]', 2), ('[time]', -2))),  # milligray
    'milligray': (0.001, (('[length]', 2), ('[time]', -2))),  # milligray
    'uGy': (1e-06, (('[length]', 2), ('[time]', -2))),  # microgray
    'microgray': (1e-06, (('[length]', 2), ('[time]', -2))),  # microgray
    'nGy': (1e-09, (('[length]', 2), ('[time]', -2))),  # nanogray
    'nanogray': (1e-09, (('[length]', 2), ('[time]', -2))),  # nanogray
    'pGy': (1e-12, (('[length]', 2), ('[time]', -2))),  # picogray
    'picogray': (1e-12, (('[length]', 2), ('[time]', -2))),  # picogray
    'fGy': (1e-15, (('[length]', 2), ('[time]', -2))),  # femtogray
    'femtogray': (1e-15, (('[length]', 2), ('[time]', -2))),  # femtogray
    'aGy': (1e-18, (('[length]', 2), ('[time]', -2))),  # attogray
    'attogray': (1e-18, (('[length]', 2), ('[time]', -2))),  # attogray
    'zGy': (1e-21, (('[length]', 2), ('[time]', -2))),  # zeptogray
    'zeptogray': (1e-21, (('[length]', 2), ('[time]', -2))),  # zeptogray
    'yGy': (1e-24, (('[length]', 2), ('[time]', -2))),  # yoctogray
    'yoctogray': (1e-24, (('[length]', 2), ('[time]', -2))),  # yoctogray
    'Sv': (1.0, (('[length]', 2), ('[time]', -2))),  # sievert
    'sievert': (1.0, (('[length]', 2), ('[time]', -2))),  # sievert
    'YSv': (1e+24, (('[length]', 2), ('[time]', -2))),  # yottasievert
    'yottasievert': (1e+24, (('[length]', 2), ('[time]', -2))),  # yottasievert
    'ZSv': (1e+21, (('[length]', 2), ('[time]', -2))),  # zettasievert
    'zettasievert': (1e+21, (('[length]', 2), ('[time]', -2))),  # zettasievert
    'ESv': (1e+18, (('[length]', 2), ('[time]', -2))),  # exasievert
    'exasievert': (1e+18, (('[length]', 2), ('[time]', -2))),  # exasievert
    'PSv': (1000000000000000.0, (('[length]', 2), ('[time]', -2))),  # petasievert
    'petasievert': (1000000000000000.0, (('[length]', 2), ('[time]', -2))),  # petasievert
    'TSv': (1000000000000.0, (('[length]', 2), ('[time]', -2))),  # terasievert
    'terasievert': (1000000000000.0, (('[length]', 2), ('[time]', -2))),  # terasievert
    'GSv': (1000000000.0, (('[length]', 2), ('[time]', -2))),  # gigasievert
    'gigasievert': (1000000000.0, (('[length]', 2), ('[time]', -2))),  # gigasievert
    'MSv': (1000000.0, (('[length]', 2), ('[time]', -2))),  # megasievert
    'megasievert': (1000000.0, (('[length]', 2), ('[time]', -2))),  # megasievert
    'kSv': (1000.0, (('[length]', 2), ('[time]', -2))),  # kilosievert
    'kilosievert': (1000.0, (('[length]', 2), ('[time]', -2))),  # kilosievert
    'hSv': (100.0, (('[length]', 2), ('[time]', -2))),  # hectosievert
    'hectosievert': (100.0, (('[length]', 2), ('[time]', -2))),  # hectosievert
    'daSv': (10.0, (('[length]', 2), ('[time]', -2))),  # decasievert
    'decasievert': (10.0, (('[length]', 2), ('[time]', -2))),  # decasievert
    'dSv': (0.1, (('[length]', 2), ('[time]', -2))),  # decisievert
    'decisievert': (0.1, (('[length]', 2), ('[time]', -2))),  # decisievert
    'cSv': (0.01, (('[length]', 2), ('[time]', -2))),  # centisievert
    'centisievert': (0.01, (('[length]', 2), ('[time]', -2))),  # centisievert
    'mSv': (0.001, (('[length]', 2), ('[time]', -2))),  # millisievert
    'millisievert': (0.001, (('[length]', 2), ('[time]', -2))),  # millisievert
    'uSv': (1e-06, (('[length]', 2), ('[time]', -2))),  # microsievert
    'microsievert': (1e-06, (('[length]', 2), ('[time]', -2))),  # microsievert
    'nSv': (1e-09, (('[length]', 2), ('[time]', -2))),  # nanosievert
    'nanosievert': (1e-09, (('[length]', 2), ('[time]', -2))),  # nanosievert
    'pSv': (1e-12, (('[length]', 2), ('[time]', -2))),  # picosievert
    'picosievert': (1e-12, (('[length]', 2), ('[time]', -2))),  # picosievert
    'fSv': (1e-15, (('[length]', 2), ('[time]', -2))),  # femtosievert
    'femtosievert': (1e-15, (('[length]', 2), ('[time]', -2))),  # femtosievert
    'aSv': (1e-18, (('[length]', 2), ('[time]', -2))),  # attosievert
    'attosievert': (1e-18, (('[length]', 2), ('[time]', -2))),  # attosievert
    'zSv': (1e-21, (('[length]', 2), ('[time]', -2))),  # zeptosievert
    'zeptosievert': (1e-21, (('[length]', 2), ('[time]', -2))),  # zeptosievert
    'ySv': (1e-24, (('[length]', 2), ('[time]', -2))),  # yoctosievert
    'yoctosievert': (1e-24, (('[length]', 2), ('[time]', -2))),  # yoctosievert
    'kat': (1.0, (('[time]', -1), ('[substance]', 1))),  # katal
    'katal': (1.0, (('[time]', -1), ('[substance]', 1))),  # katal
    'Ykat': (1e+24, (('[time]', -1), ('[substance]', 1))),  # yottakatal
    'yottakatal': (1e+24, (('[time]', -1), ('[substance]', 1))),  # yottakatal
    'Zkat': (1e+21, (('[time]', -1), ('[substance]', 1))),  # zettakatal
    'zettakatal': (1e+21, (('[time]', -1), ('[substance]', 1))),  # zettakatal
    'Ekat': (1e+18, (('[time]', -1), ('[substance]', 1))),  # exakatal
    'exakatal': (1e+18, (('[time]', -1), ('[substance]', 1))),  # exakatal
    'Pkat': (1000000000000000.0, (('[time]', -1), ('[substance]', 1))),  # petakatal
    'petakatal': (1000000000000000.0, (('[time]', -1), ('[substance]', 1))),  # petakatal
    'Tkat': (1000000000000.0, (('[time]', -1), ('[substance]', 1))),  # terakatal
    'terakatal': (1000000000000.0, (('[time]', -1), ('[substance]', 1))),  # terakatal
    'Gkat': (1000000000.0, (('[time]', -1), ('[substance]', 1))),  # gigakatal
    'gigakatal': (1000000000.0, (('[time]', -1), ('[substance]', 1))),  # gigakatal
    'Mkat': (1000000.0, (('[time]', -1), ('[substance]', 1))),  # megakatal
    'megakatal': (1000000.0, (('[time]', -1), ('[substance]', 1))),  # megakatal
    'kkat': (1000.0, (('[time]', -1), ('[substance]', 1))),  # kilokatal
    'kilokatal': (1000.0, (('[time]', -1), ('[substance]', 1))),  # kilokatal
    'hkat': (100.0, (('[time]', -1), ('[substance]', 1))),  # hectokatal
    'hectokatal': (100.0, (('[time]', -1), ('[substance]', 1))),  # hectokatal
    'dakat': (10.0, (('[time]', -1), ('[substance]', 1))),  # decakatal
    'decakatal': (10.0, (('[time]', -1), ('[substance]', 1))),  # decakatal
    'dkat': (0.1, (('[time]', -1), ('[substance]', 1))),  # decikatal
    'decikatal': (0.1, (('[time]', -1), ('[substance]', 1))),  # decikatal
    'ckat': (0.01, (('[time]', -1), ('[substance]', 1))),  # centikatal
    'centikatal': (0.01, (('[time]', -1), ('[substance]', 1))),  # centikatal
    'mkat': (0.001, (('[time]', -1), ('[substance]', 1))),  # millikatal
    'millikatal': (0.001, (('[time]', -1), ('[substance]', 1))),  # millikatal
    'ukat': (1e-06, (('[time]', -1), ('[substance]', 1))),  # microkatal
    'microkatal': (1e-06, (('[time]', -1), ('[substance]', 1))),  # microkatal
    'nkat': (1e-09, (('[time]', -1), ('[substance]', 1))),  # nanokatal
    'nanokatal': (1e-09, (('[time]', -1), ('[substance]', 1))),  # nanokatal
    'pkat': (1e-12, (('[time]', -1), ('[substance]', 1))),  # picokatal
    'picokatal': (1e-12, (('[time]', -1), ('[substance]', 1))),  # picokatal
    'fkat': (1e-15, (('[time]', -1), ('[substance]', 1))),  # femtokatal
    'femtokatal': (1e-15, (('[time]', -1), ('[substance]', 1))),  # femtokatal
    'akat': (1e-18, (('[time]', -1), ('[substance]', 1))),  # attokatal
    'attokatal': (1e-18, (('[time]', -1), ('[substance]', 1))),  # attokatal
    'zkat': (1e-21, (('[time]', -1), ('[substance]', 1))),  # zeptokatal
    'zeptokatal': (1e-21, (('[time]', -1), ('[substance]', 1))),  # zeptokatal
    'ykat': (1e-24, (('[time]', -1), ('[substance]', 1))),  # yoctokatal
    'yoctokatal': (1e-24, (('[time]', -1), ('[substance]', 1))),  # yoctokatal
    'L': (0.0010000000000000002, (('[length]', 3),)),  # liter
    'l': (0.0010000000000000002, (('[length]', 3),)),  # liter
    'liter': (0.0010000000000000002, (('[length]', 3),)),  # liter
    'litre': (0.0010000000000000002, (('[length]', 3),)),  # liter
    'YL': (1.0000000000000003e+21, (('[length]', 3),)),  # yottaliter
    'Yl': (1.0000000000000003e+21, (('[length]', 3),)),  # yottaliter
    'yottaliter': (1.0000000000000003e+21, (('[length]', 3),)),  # yottaliter
    'yottalitre': (1.0000000000000003e+21, (('[length]', 3),)),  # yottaliter
    'ZL': (1.0000000000000003e+18, (('[length]', 3),)),  # zettaliter
    'Zl': (1.0000000000000003e+18, (('[length]', 3),)),  # zettaliter
    'zettaliter': (1.0000000000000003e+18, (('[length]', 3),)),  # zettaliter
    'zettalitre': (1.0000000000000003e+18, (('[length]', 3),)),  # zettaliter
    'EL': (1000000000000000.2, (('[length]', 3),)),  # exaliter
    'El': (1000000000000000.2, (('[length]', 3),)),  # exaliter
    'exaliter': (1000000000000000.2, (('[length]', 3),)),  # exaliter
    'exalitre': (1000000000000000.2, (('[length]', 3),)),  # exaliter
    'PL': (1000000000000.0002, (('[length]', 3),)),  # petaliter
    'Pl': (1000000000000.0002, (('[length]', 3),)),  # petaliter
    'petaliter': (1000000000000.0002, (('[length]', 3),)),  # petaliter
    'petalitre': (1000000000000.0002, (('[length]', 3),)),  # petaliter
    'TL': (1000000000.0000002, (('[length]', 3),)),  # teraliter
    'Tl': (1000000000.0000002, (('[length]', 3),)),  # teraliter
    'teraliter': (1000000000.0000002, (('[length]', 3),)),  # teraliter
    'teralitre': (1000000000.0000002, (('[length]', 3),)),  # teraliter
    'GL': (1000000.0000000002, (('[length]', 3),)),  # gigaliter
    'Gl': (1000000.0000000002, (('[length]', 3),)),  # gigaliter
    'gigaliter': (1000000.0000000002, (('[length]', 3),)),  # gigaliter
    'gigalitre': (1000000.0000000002, (('[length]', 3),)),  # gigaliter
    'ML': (1000.0000000000002, (('[length]', 3),)),  # megaliter
    'Ml': (1000.0000000000002, (('[length]', 3),)),  # megaliter
    'megaliter': (1000.0000000000002, (('[length]', 3),)),  # megaliter
    'megalitre': (1000.0000000000002, (('[length]', 3),)),  # megaliter
    'kL': (1.0000000000000002, (('[length]', 3),)),  # kiloliter
    'kl': (1.0000000000000002, (('[length]', 3),)),  # kiloliter
    'kiloliter': (1.0000000000000002, (('[length]', 3),)),  # kiloliter
    'kilolitre': (1.0000000000000002, (('[length]', 3),)),  # kiloliter
    'hL': (0.10000000000000002, (('[length]', 3),)),  # hectoliter
    'hl': (0.10000000000000002, (('[length]', 3),)),  # hectoliter
    'hectoliter': (0.10000000000000002, (('[length]', 3),)),  # hectoliter
    'hectolitre': (0.10000000000000002, (('[length]', 3),)),  # hectoliter
    'daL': (0.010000000000000002, (('[length]', 3),)),  # decaliter
    'dal': (0.010000000000000002, (('[length]', 3),)),  # decaliter
    'decaliter': (0.010000000000000002, (('[length]', 3),)),  # decaliter
    'decalitre': (0.010000000000000002, (('[length]', 3),)),  # decaliter
    'dL': (0.00010000000000000002, (('[length]', 3),)),  # deciliter
    'dl': (0.00010000000000000002, (('[length]', 3),)),  # deciliter
    'deciliter': (0.00010000000000000002, (('[length]', 3),)),  # deciliter
    'decilitre': (0.00010000000000000002, (('[length]', 3),)),  # deciliter
    'cL': (1.0000000000000003e-05, (('[length]', 3),)),  # centiliter
    'cl': (1.0000000000000003e-05, (('[length]', 3),)),  # centiliter
    'centiliter': (1.0000000000000003e-05, (('[length]', 3),)),  # centiliter
    'centilitre': (1.0000000000000003e-05, (('[length]', 3),)),  # centiliter
    'mL': (1.0000000000000002e-06, (('[length]', 3),)),  # milliliter
    'ml': (1.0000000000000002e-06, (('[length]', 3),)),  # milliliter
    'milliliter': (1.0000000000000002e-06, (('[length]', 3),)),  # milliliter
    'millilitre': (1.0000000000000002e-06, (('[length]', 3),)),  # milliliter
    'uL': (1.0000000000000003e-09, (('[length]', 3),)),  # microliter
    'ul': (1.0000000000000003e-09, (('[length]', 3),)),  # microliter
    'microliter': (1.0000000000000003e-09, (('[length]', 3),)),  # microliter
    'microlitre': (1.0000000000000003e-09, (('[length]', 3),)),  # microliter
    'nL': (1.0000000000000004e-12, (('[length]', 3),)),  # nanoliter
    'nl': (1.0000000000000004e-12, (('[length]', 3),)),  # nanoliter
    'nanoliter': (1.0000000000000004e-12, (('[length]', 3),)),  # nanoliter
    'nanolitre': (1.0000000000000004e-12, (('[length]', 3),)),  # nanoliter
    'pL': (1.0000000000000003e-15, (('[length]', 3),)),  # picoliter
    'pl': (1.0000000000000003e-15, (('[length]', 3),)),  # picoliter
    'picoliter': (1.0000000000000003e-15, (('[length]', 3),)),  # picoliter
    'picolitre': (1.0000000000000003e-15, (('[length]', 3),)),  # picoliter
    'fL': (1.0000000000000003e-18, (('[length]', 3),)),  # femtoliter
    'fl': (1.0000000000000003e-18, (('[length]', 3),)),  # femtoliter
    'femtoliter': (1.0000000000000003e-18, (('[length]', 3),)),  # femtoliter
    'femtolitre': (1.0000000000000003e-18, (('[length]', 3),)),  # femtoliter
    'aL': (1.0000000000000003e-21, (('[length]', 3),)),  # attoliter
    'al': (1.0000000000000003e-21, (('[length]', 3),)),  # attoliter
    'attoliter': (1.0000000000000003e-21, (('[length]', 3),)),  # attoliter
    'attolitre': (1.0000000000000003e-21, (('[length]', 3),)),  # attoliter
    'zL': (1.0000000000000001e-24, (('[length]', 3),)),  # zeptoliter
    'zl': (1.0000000000000001e-24, (('[length]', 3),)),  # zeptoliter
    'zeptoliter': (1.0000000000000001e-24, (('[length]', 3),)),  # zeptoliter
    'zeptolitre': (1.0000000000000001e-24, (('[length]', 3),)),  # zeptoliter
    'yL': (1.0000000000000002e-27, (('[length]', 3),)),  # yoctoliter
    'yl': (1.0000000000000002e-27, (('[length]', 3),)),  # yoctoliter
    'yoctoliter': (1.0000000000000002e-27, (('[length]', 3),)),  # yoctoliter
    'yoctolitre': (1.0000000000000002e-27, (('[length]', 3),)),  # yoctoliter
    'min': (60.0, (('[time]', 1),)),  # minute
    'minute': (60.0, (('[time]', 1),)),  # minute
    'h': (3600.0, (('[time]', 1),)),  # hour
    'hour': (3600.0, (('[time]', 1),)),  # hour
    'hr': (3600.0, (('[time]', 1),)),  # hour
    'd': (86400.0, (('[time]', 1),)),  # day
    'day': (86400.0, (('[time]', 1),)),  # day
    'week': (604800.0, (('[time]', 1),)),  # week
    'deg': (0.017453292519943295, ()),  # degree
    'degree': (0.017453292519943295, ()),  # degree
    'arcmin': (0.00029088820866572163, ()),  # arcminute
    'arcminute': (0.00029088820866572163, ()),  # arcminute
    'arcsec': (4.84813681109536e-06, ()),  # arcsecond
    'arcsecond': (4.84813681109536e-06, ()),  # arcsecond
    'ha': (10000.0, (('[length]', 2),)),  # hectare
    'hectare': (10000.0, (('[length]', 2),)),  # hectare
    't': (1000.0, (('[mass]', 1),)),  # metric_ton
    'tonne': (1000.0, (('[mass]', 1),)),  # metric_ton
    'metric_ton': (1000.0, (('[mass]', 1),)),  # metric_ton
    'eV': (1.602176634e-19, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # electron_volt
    'Da': (1.6605390689200003e-27, (('[mass]', 1),)),  # dalton
    'dalton': (1.6605390689200003e-27, (('[mass]', 1),)),  # dalton
    'degC': (1.0, (('[temperature]', 1),)),  # degree_Celsius
    'celsius': (1.0, (('[temperature]', 1),)),  # degree_Celsius
    'degree_Celsius': (1.0, (('[temperature]', 1),)),  # degree_Celsius
    'rpm': (0.10471975511965977, (('[time]', -1),)),  # revolutions_per_minute
    'revolution': (6.283185307179586, ()),  # turn
    'turn': (6.283185307179586, ()),  # turn
    'cycle': (6.283185307179586, ()),  # turn
    'bar': (100000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # bar
    'mbar': (100.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # millibar
    'kbar': (100000000.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # kilobar
    'atm': (101325.0, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # standard_atmosphere
    'psi': (6894.7572931683635, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # pound_force_per_square_inch
    'torr': (133.32236842105263, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # torr
    'mmHg': (133.322387415, (('[mass]', 1), ('[length]', -1), ('[time]', -2))),  # millimeter_Hg
    'percent': (0.01, ()),  # percent
    'ppm': (1e-06, ()),  # ppm
    'Wh': (3600.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # watt_hour
    'kWh': (3600000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # kilowatt_hour
    'MWh': (3600000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # megawatt_hour
    'GWh': (3600000000000.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # gigawatt_hour
    'Ah': (3600.0, (('[time]', 1), ('[current]', 1))),  # ampere_hour
    'mAh': (3.6, (('[time]', 1), ('[current]', 1))),  # milliampere_hour
    'kph': (0.2777777777777778, (('[length]', 1), ('[time]', -1))),  # kilometer_per_hour
    'knot': (0.5144444444444445, (('[length]', 1), ('[time]', -1))),  # knot
    'inch': (0.0254, (('[length]', 1),)),  # inch
    'ft': (0.30479999999999996, (('[length]', 1),)),  # foot
    'foot': (0.30479999999999996, (('[length]', 1),)),  # foot
    'yd': (0.9144, (('[length]', 1),)),  # yard
    'mi': (1609.344, (('[length]', 1),)),  # mile
    'lb': (0.4535923700000001, (('[mass]', 1),)),  # pound
    'lbf': (4.4482216152605005, (('[mass]', 1), ('[length]', 1), ('[time]', -2))),  # force_pound
    'gal': (0.0037854117839999993, (('[length]', 3),)),  # gallon
    'cal': (4.184, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # calorie
    'kcal': (4184.0, (('[mass]', 1), ('[length]', 2), ('[time]', -2))),  # kilocalorie
    'hp': (745.6998715822701, (('[mass]', 1), ('[length]', 2), ('[time]', -3))),  # horsepower
}
