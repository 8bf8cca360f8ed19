/* keys.c: the perception-key vocabulary, the one list that perception
 * produces and group tables may name, with each key's trade name. */
#include "irrecon/keys.h"

#include <string.h>

/* Sorted by key (bsearch); perceive.h describes each key's attributes. */
static const char *const keys[][2] = {
	{"acid_halide", "acid halide"},
	{"alcohol_primary", "primary alcohol"},
	{"alcohol_secondary", "secondary alcohol"},
	{"alcohol_tertiary", "tertiary alcohol"},
	{"aldehyde", "aldehyde"},
	{"alkene", "alkene"},
	{"alkyl_sulfate", "alkyl sulfate"},
	{"alkyne_internal", "internal alkyne"},
	{"alkyne_terminal", "terminal alkyne"},
	{"allene", "allene"},
	{"amide", "amide"},
	{"amine", "amine"},
	{"ammonium", "ammonium"},
	{"anhydride", "anhydride"},
	{"azide", "azide"},
	{"azine_ring", "azine ring"},
	{"azo", "azo"},
	{"azole_nh", "azole N-H"},
	{"azole_ring", "azole ring"},
	{"b_h", "B-H"},
	{"benzene_ring", "benzene ring"},
	{"boronic_acid", "boronic acid"},
	{"boronic_ester", "boronic ester"},
	{"c_br", "C-Br"},
	{"c_cl", "C-Cl"},
	{"c_d", "C-D"},
	{"c_f", "C-F"},
	{"c_i", "C-I"},
	{"carbamate", "carbamate"},
	{"carbodiimide", "carbodiimide"},
	{"carbonate", "carbonate"},
	{"carbonate_ion", "carbonate ion"},
	{"carboxylate", "carboxylate"},
	{"carboxylic_acid", "carboxylic acid"},
	{"cyanate_ester", "cyanate ester"},
	{"cyanide", "cyanide (HCN, CN-)"},
	{"diazo", "diazo"},
	{"diketone_1_2", "1,2-diketone"},
	{"diketone_1_3", "1,3-diketone"},
	{"disulfide", "disulfide"},
	{"epoxide", "epoxide"},
	{"ester", "ester"},
	{"ether", "ether"},
	{"formate", "formate"},
	{"furan_ring", "furan ring"},
	{"gem_dimethyl", "gem-dimethyl"},
	{"hydrazone", "hydrazone"},
	{"imide", "imide"},
	{"imine", "imine"},
	{"isocyanate", "isocyanate"},
	{"isonitrile", "isonitrile"},
	{"isopropyl", "isopropyl"},
	{"isothiocyanate", "isothiocyanate"},
	{"ketone", "ketone"},
	{"lactam", "lactam"},
	{"lactone", "lactone"},
	{"long_chain", "(CH2)n chain, n >= 4"},
	{"methine", "CH (methine)"},
	{"methyl", "CH3 (methyl)"},
	{"methylene", "CH2 (methylene)"},
	{"n_d", "N-D"},
	{"n_oxide", "N-oxide"},
	{"nitramine", "nitramine (N-NO2)"},
	{"nitrate_ester", "nitrate ester"},
	{"nitrate_ion", "nitrate ion"},
	{"nitrile", "nitrile"},
	{"nitrite_ester", "nitrite ester"},
	{"nitro", "nitro"},
	{"nitroso", "nitroso"},
	{"o_d", "O-D"},
	{"oxime", "oxime"},
	{"p_aryl", "P-aryl"},
	{"p_h", "P-H"},
	{"peroxide", "peroxide"},
	{"phenol", "phenol"},
	{"phosphate", "phosphate"},
	{"phosphate_ion", "phosphate ion"},
	{"phosphine", "phosphine"},
	{"phosphine_oxide", "phosphine oxide"},
	{"phosphonate", "phosphonate"},
	{"pyridine_ring", "pyridine ring"},
	{"pyrrole_nh", "pyrrole-type N-H"},
	{"pyrrole_ring", "pyrrole ring"},
	{"quinone", "quinone"},
	{"si_aryl", "Si-aryl"},
	{"si_h", "Si-H"},
	{"si_methyl", "Si-CH3"},
	{"siloxane", "Si-O"},
	{"sulfate_ester", "dialkyl sulfate"},
	{"sulfate_ion", "sulfate ion"},
	{"sulfide", "sulfide"},
	{"sulfonamide", "sulfonamide"},
	{"sulfonate", "sulfonate anion"},
	{"sulfonate_ester", "sulfonate ester"},
	{"sulfone", "sulfone"},
	{"sulfonic_acid", "sulfonic acid"},
	{"sulfonyl_chloride", "sulfonyl chloride"},
	{"sulfonyl_fluoride", "sulfonyl fluoride"},
	{"sulfoxide", "sulfoxide"},
	{"tert_butyl", "tert-butyl"},
	{"thioacid", "thioacid"},
	{"thiocarbamate", "thiocarbamate"},
	{"thiocarbonate", "thiocarbonate"},
	{"thiocarbonyl", "thiocarbonyl"},
	{"thiocyanate", "thiocyanate"},
	{"thiocyanate_ion", "thiocyanate ion"},
	{"thioester", "thioester"},
	{"thiol", "thiol"},
	{"thiophene_ring", "thiophene ring"},
	{"urea", "urea"},
	{"water", "water"},
};

#define NKEYS (sizeof keys / sizeof keys[0])

const char *irr_key_name(const char *key)
{
	size_t lo = 0, hi = NKEYS;
	if (!key)
		return NULL;
	while (lo < hi) {
		size_t mid = lo + (hi - lo) / 2;
		int c = strcmp(keys[mid][0], key);
		if (c == 0)
			return keys[mid][1];
		if (c < 0)
			lo = mid + 1;
		else
			hi = mid;
	}
	return NULL;
}

size_t irr_key_count(void)
{
	return NKEYS;
}

const char *irr_key_at(size_t i)
{
	return i < NKEYS ? keys[i][0] : NULL;
}
